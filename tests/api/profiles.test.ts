import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { validateContractInput } from '../../shared/engine';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { ngspiceSpectrum, requireNgspice } from '../support/ngspice';

const t = startTestApp();
afterAll(() => t.stop());

const INPUT = {
  toneHz: 1000, inputPeakV: 0.1, driveGain: 20, railPeakV: 4.0,
  clipper: {
    topology: 'shunt', seriesOhms: 2200, shuntFarads: 0,
    positive: [{ is: 2.52e-9, n: 1.752, rs: 0.568 }], negative: [{ preset: 'led-red' }],
  },
  temperatureC: 27, harmonics: 10,
};

describe('POST /api/profiles', () => {
  beforeAll(() => requireNgspice());
  it('answers the contract with harmonics that agree with ngspice for the same JSON', async () => {
    const agent = await signedInAgent(t.app, DEMO.planner);
    const res = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(INPUT).expect(200);
    expect(Object.keys(res.body).sort()).toEqual(['dcV', 'fundamentalPeakV', 'harmonics', 'thdF', 'thdR']);
    expect(res.body.harmonics).toHaveLength(10);
    // Outside check: ngspice (Debian package) simulates the same circuit; engine.md's tolerances.
    const spice = ngspiceSpectrum(validateContractInput(INPUT));
    expect(Math.abs(20 * Math.log10(res.body.fundamentalPeakV / spice.fundamentalPeakV))).toBeLessThan(0.3);
    let compared = 0;
    for (let k = 2; k <= 10; k++) {
      const ref = spice.harmonics[k - 1].dbc;
      if (ref > -40) { expect(Math.abs(res.body.harmonics[k - 1].dbc - ref), `H${k}`).toBeLessThan(0.3); compared++; }
      else if (ref > -60) { expect(Math.abs(res.body.harmonics[k - 1].dbc - ref), `H${k}`).toBeLessThan(1); compared++; }
    }
    expect(compared).toBeGreaterThan(2);
    expect(Math.abs(res.body.thdF / spice.thdF - 1)).toBeLessThan(0.02);
    expect(res.body.harmonics[1].dbc).toBeGreaterThan(res.body.harmonics[2].dbc); // asymmetric: H2 above H3
  });

  it('names the offending field on invalid input with a 400', async () => {
    const agent = await signedInAgent(t.app, DEMO.tester);
    const bad = { ...INPUT, clipper: { ...INPUT.clipper, positive: [{ is: -1, n: 1.7, rs: 0.5 }] } };
    const res = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(bad).expect(400);
    expect(Object.keys(res.body.error.fields)).toEqual(['clipper.positive[0].is']);
  });
});
