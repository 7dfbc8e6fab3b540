import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DEMO, signedInAgent, startTestApp } from '../support/app';

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
  it('answers exactly what the engine CLI prints for the same JSON', async () => {
    const agent = await signedInAgent(t.app, DEMO.planner);
    const res = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(INPUT).expect(200);
    const file = path.join(mkdtempSync(path.join(tmpdir(), 'kneepoint-profile-')), 'in.json');
    writeFileSync(file, JSON.stringify(INPUT));
    const cli = JSON.parse(execFileSync('npm', ['run', '--silent', 'profile', '--', file], { encoding: 'utf8' }));
    expect(res.body).toEqual(cli);
    expect(res.body.harmonics).toHaveLength(10);
    expect(res.body.harmonics[1].dbc).toBeGreaterThan(res.body.harmonics[2].dbc); // asymmetric: H2 above H3
  });

  it('names the offending field on invalid input with a 400', async () => {
    const agent = await signedInAgent(t.app, DEMO.tester);
    const bad = { ...INPUT, clipper: { ...INPUT.clipper, positive: [{ is: -1, n: 1.7, rs: 0.5 }] } };
    const res = await agent.post('/api/profiles').set('X-CSRF-Token', agent.csrf).send(bad).expect(400);
    expect(Object.keys(res.body.error.fields)).toEqual(['clipper.positive[0].is']);
  });
});
