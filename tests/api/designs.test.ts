// POST /api/designs/search: the option designer's search in the compute pool answers exactly what the
// design CLI and runDesign answer for the same JSON; bad input and spaces above the bound are 400s with
// the field path; a client that goes away stops the search.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DESIGN_LIMITS } from '../../shared/design/schema';
import { countCandidates, parseDesignInput, runDesign } from '../../shared/design/search';
import { DEVICE_PRESETS } from '../../shared/engine/index';
import { compute } from '../../server/compute/pool';
import { runningDesignSearches } from '../../server/services/engine/designs';
import { DEMO, signedInAgent, startTestApp } from '../support/app';

const t = startTestApp();
afterAll(() => t.stop());

const STAGE = { toneHz: 1000, inputPeakV: 0.1, driveGain: 40, railPeakV: 4.5, temperatureC: 27, harmonics: 10 };
const SPACE = {
  ...STAGE, devices: ['si-small-signal', 'led-red', 'germanium-point-contact'], maxPerSide: 2, topologies: ['shunt', 'feedback'],
  seriesOhms: [2200, 4700], feedbackOhms: 100000, groundOhms: 4700,
};
const CONTROL = { minGain: 1, maxGain: 200, taper: 'log' };
const roundTrip = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

/** Every preset, 1…3 per side, E12 from 1 k to 8.2 k, four capacitors and an onset target: minutes of work. */
const HEAVY = {
  ...STAGE, devices: DEVICE_PRESETS.map((p) => p.id), maxPerSide: 3, topologies: ['shunt', 'feedback'],
  seriesOhms: { eSeries: 'E12', min: 1000, max: 8200 }, feedbackOhms: 100000, groundOhms: 4700,
  capacitorFarads: [0, 1e-9, 1e-8, 4.7e-8], drive: CONTROL, target: { thdFPercent: [5, 10], onsetDrivePercent: [20, 40] },
};

function designCli(body: unknown) {
  const file = join(mkdtempSync(join(tmpdir(), 'kneepoint-design-api-')), 'in.json');
  writeFileSync(file, JSON.stringify(body));
  const r = spawnSync('npm', ['run', '--silent', 'design', '--', file], { encoding: 'utf8', cwd: process.cwd() });
  return { status: r.status, json: JSON.parse(r.stdout) as unknown };
}

describe('POST /api/designs/search', () => {
  it("answers the design CLI's output for the same input, searched in the compute pool", async () => {
    const agent = await signedInAgent(t.app, DEMO.owner);
    const input = { ...SPACE, drive: CONTROL, target: { thdFPercent: [5, 10], h2MinusH3Db: [0, 6], onsetDrivePercent: [20, 50] }, limit: 12 };
    const res = await agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(input).expect(200);
    expect(res.body.searched).toBe(63);
    expect(res.body.candidates).toHaveLength(12);
    expect(res.body).toEqual(roundTrip(runDesign(input)));
    const cli = designCli(input);
    expect(cli.status).toBe(0);
    expect(res.body).toEqual(cli.json);
  }, 120_000);

  it('refuses bad input with a 400 naming the field path, like the CLI', async () => {
    const agent = await signedInAgent(t.app, DEMO.owner);
    const cases: [unknown, string][] = [
      [{ ...SPACE, devices: ['si-small-signal', { is: 1e-9, n: 20 }], target: { thdFPercent: [1, 2] } }, 'devices[1].n'],
      [{ ...SPACE, target: { thdFPercent: [5, 1] } }, 'target.thdFPercent'],
      [{ ...SPACE, target: { onsetDrivePercent: [10, 20] } }, 'drive'],
      [{ ...SPACE, maxPerSide: 0, target: { thdFPercent: [1, 2] } }, 'maxPerSide'],
    ];
    for (const [body, path] of cases) {
      const res = await agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(body as object).expect(400);
      expect(Object.keys(res.body.error.fields)).toEqual([path]);
      expect(designCli(body).json).toEqual({ error: { message: res.body.error.message, path } });
    }
  }, 120_000);

  it('refuses a space above the candidate bound with a 400 that states it, before any work', async () => {
    const agent = await signedInAgent(t.app, DEMO.owner);
    // 9 presets × 1…6 per side = 54 strings, 54·55/2 = 1485 pairs; × (E24 10 Ω…9.1 kΩ = 72 values) × 3 capacitors > 200 000.
    const huge = { ...SPACE, devices: DEVICE_PRESETS.map((p) => p.id), maxPerSide: 6, seriesOhms: { eSeries: 'E24', min: 10, max: 9100 }, capacitorFarads: [0, 1e-9, 1e-8], target: { thdFPercent: [1, 2] } };
    const res = await agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(huge).expect(400);
    expect(res.body.error.fields._).toMatch(new RegExp(`holds \\d+ candidates; at most ${DESIGN_LIMITS.candidates}`));
  });

  it('stops a search whose caller goes away, and runs one search at a time', async () => {
    expect(countCandidates(parseDesignInput(HEAVY))).toBeGreaterThan(15_000);
    // In the pool: a signal already aborted stops the search before its first candidate.
    const stopped = await compute.designSearch(HEAVY, AbortSignal.abort());
    expect(stopped).toMatchObject({ searched: 0, cancelled: true });

    const agent = await signedInAgent(t.app, DEMO.owner);
    const small = { ...SPACE, symmetry: 'symmetric', topologies: ['feedback'], target: { thdFPercent: [1, 2] } };
    const heavy = agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(HEAVY);
    const settled = heavy.then(() => 'answered', () => 'aborted');
    const until = async (done: () => boolean) => {
      for (let i = 0; i < 1200 && !done(); i++) await new Promise((r) => setTimeout(r, 50));
    };
    await until(() => runningDesignSearches() === 1);
    expect(runningDesignSearches()).toBe(1);
    // While it runs, another search is refused with 429.
    const busy = await agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(small).expect(429);
    expect(busy.body.error.message).toMatch(/Another design search is running/);
    heavy.abort();
    // The heavy search (minutes of work) stops at its next candidate once its client is gone, long
    // before it could have ended (the wait gives up after 60 s).
    await until(() => runningDesignSearches() === 0);
    expect(runningDesignSearches()).toBe(0);
    expect(await Promise.race([settled, new Promise((r) => setTimeout(() => r('pending'), 1000))])).not.toBe('answered');
    await agent.post('/api/designs/search').set('X-CSRF-Token', agent.csrf).send(small).expect(200);
  }, 180_000);
});
