import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { validateContractInput } from '../../shared/engine';
import { DEMO, signedInAgent, startTestApp } from '../support/app';
import { profileCost } from '../../server/services/engine/profiles';
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
  // The answer comes from the compute pool's worker thread; ngspice is the outside check.
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

describe('POST /api/profiles is bounded', () => {
  it('refuses a body above the cost cap with a 400 that states the limit', async () => {
    const agent = await signedInAgent(t.app, DEMO.customer);
    // 20 different devices on each side behind a capacitor: (1 + 40/8) × 10 = 60 cost units, by hand.
    const distinct = (k: number) => Array.from({ length: k }, (_, i) => ({ is: 2.52e-9 * (1 + i / 100), n: 1.752, rs: 0.568 }));
    const heavy = { ...INPUT, clipper: { ...INPUT.clipper, shuntFarads: 1e-7, positive: distinct(20), negative: distinct(20) } };
    expect(profileCost(heavy)).toBe(60);
    const res = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(heavy).expect(400);
    expect(res.body.error.fields.clipper).toMatch(/60\.0 cost units and the limit is 30/);
    // The same circuit without its capacitor is (1 + 40/8) = 6 units: computed.
    await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send({ ...heavy, clipper: { ...heavy.clipper, shuntFarads: 0 } }).expect(200);
  });

  it('answers 429 after the per-account limit, counted per account and not per address', async () => {
    const limited = startTestApp({ PROFILE_RATE_LIMIT: '3', PROFILE_RATE_WINDOW_SECONDS: '60' });
    try {
      const agent = await signedInAgent(limited.app, DEMO.assembler);
      await limited.knex('rate_limits').where('key', 'like', 'profiles:%').delete();
      for (let i = 0; i < 3; i++) await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(INPUT).expect(200);
      const refused = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).set('X-Forwarded-For', '203.0.113.9').send(INPUT).expect(429);
      expect(refused.body.error.message).toMatch(/At most 3 profiles per 60 s per account/);
      // Another account still has its own allowance.
      const other = await signedInAgent(limited.app, DEMO.tester);
      await other.post('/api/profiles').set('X-CSRF-Token', other.csrf).send(INPUT).expect(200);
    } finally {
      await limited.knex('rate_limits').where('key', 'like', 'profiles:%').delete();
      await limited.stop();
    }
  });
});
