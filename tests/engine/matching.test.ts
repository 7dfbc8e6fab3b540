// Device matching against exhaustive enumeration: the exact pairing (every objective), the
// Hungarian cross assignment, the string split's stated bound, and the CLI contract.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { optionCircuit } from '../../shared/catalog/circuit';
import { findPreset, mulberry32, resolveCircuit } from '../../shared/engine/index';
import { crossMatch, engineH2, h2Table } from '../../shared/matching/cross';
import { minCostAssignment } from '../../shared/matching/assignment';
import { matchPairs, runMatch, sortReadings, type MatchObjective, type Reading } from '../../shared/matching/pairs';
import { splitBlock } from '../../shared/matching/strings';

/** Every set of disjoint pairs of the readings (each as a list of Vf differences in mV). */
function allPairings(vf: number[]): number[][] {
  const out: number[][] = [];
  const used = new Array<boolean>(vf.length).fill(false);
  const walk = (i: number, acc: number[]) => {
    while (i < vf.length && used[i]) i++;
    if (i >= vf.length) { out.push([...acc]); return; }
    used[i] = true;
    walk(i + 1, acc); // i stays unused
    for (let j = i + 1; j < vf.length; j++) {
      if (used[j]) continue;
      used[j] = true;
      acc.push(Math.abs(vf[i] - vf[j]) * 1000);
      walk(i + 1, acc);
      acc.pop();
      used[j] = false;
    }
    used[i] = false;
  };
  walk(0, []);
  return out;
}

/** The best (count, worst, total) by brute force, in the contract's order of preference. */
function bruteForce(vf: number[], k: number, objective: MatchObjective, capMv = Infinity) {
  let best: { count: number; worst: number; total: number } | null = null;
  for (const p of allPairings(vf)) {
    if (p.length > k || p.some((d) => d > capMv + 1e-9)) continue;
    const c = { count: p.length, worst: Math.max(0, ...p), total: p.reduce((a, b) => a + b, 0) };
    const better = !best || c.count > best.count || (c.count === best.count && (objective === 'max'
      ? c.worst < best.worst - 1e-9 || (Math.abs(c.worst - best.worst) <= 1e-9 && c.total < best.total - 1e-9)
      : c.total < best.total - 1e-9));
    if (better) best = c;
  }
  return best!;
}

const randomTray = (seed: number, n: number): Reading[] => {
  const rnd = mulberry32(seed);
  // Readings on a 0.1 mV grid, as a meter shows them, so ties happen too.
  return Array.from({ length: n }, (_, i) => ({ id: `T1-${String(i + 1).padStart(2, '0')}`, vf: Math.round((0.59 + rnd() * 0.02) * 10000) / 10000 }));
};

describe('exact pairing', () => {
  // For |ΔVf| costs some optimal set of pairs is adjacent in sorted order: two crossing or nested pairs
  // a ≤ b ≤ c ≤ d can swap partners to (a,b),(c,d) without raising the total, the worst pair or any
  // pair above a cap, and a pair skipping an unused reading can take it instead. So the dynamic
  // programme over adjacent pairs must reach exactly what enumerating every pairing reaches.
  for (const objective of ['sum', 'max'] as const) {
    it(`equals exhaustive enumeration for "${objective}" on 300 random trays of up to 9 readings`, () => {
      for (let seed = 1; seed <= 300; seed++) {
        const n = 2 + (seed % 8);
        const readings = randomTray(seed, n);
        const k = 1 + (seed % 4);
        const cap = seed % 3 === 0 ? 3 : undefined;
        const out = matchPairs({ readings, pairs: k, objective, maxDeltaMv: cap });
        const best = bruteForce(readings.map((r) => r.vf), k, objective, cap);
        expect(out.pairs.length, `seed ${seed}`).toBe(best.count);
        expect(out.totalDeltaMv, `seed ${seed}`).toBeCloseTo(best.total, 3);
        if (objective === 'max') expect(out.worstDeltaMv, `seed ${seed}`).toBeCloseTo(best.worst, 3);
        // Every id is used once: in a pair or unused.
        const ids = [...out.pairs.flatMap((p) => [p.a, p.b]), ...out.unused].sort();
        expect(ids).toEqual(readings.map((r) => r.id).sort());
      }
    });
  }

  it('pairs adjacent readings in sorted order, as the exchange argument says', () => {
    const readings = randomTray(42, 40);
    const order = sortReadings(readings).map((r) => r.id);
    const out = matchPairs({ readings, pairs: 15, objective: 'sum' });
    for (const p of out.pairs) expect(Math.abs(order.indexOf(p.a) - order.indexOf(p.b))).toBe(1);
  });

  it('"max" gives up total to lower the worst pair; "sum" does the opposite', () => {
    // 0.600 0.603 0.605 0.6051 0.607, two pairs: (0.600,0.603)+(0.605,0.6051) totals 3.1 mV with a 3 mV pair;
    // (0.603,0.605)+(0.6051,0.607) totals 3.9 mV but its worst pair is 2 mV.
    const readings = [0.600, 0.603, 0.605, 0.6051, 0.607].map((vf, i) => ({ id: `r${i}`, vf }));
    const sum = matchPairs({ readings, pairs: 2, objective: 'sum' });
    const max = matchPairs({ readings, pairs: 2, objective: 'max' });
    expect([sum.totalDeltaMv, sum.worstDeltaMv]).toEqual([3.1, 3]);
    expect([max.totalDeltaMv, max.worstDeltaMv]).toEqual([3.9, 2]);
    expect(max.pairs.map((p) => [p.a, p.b])).toEqual([['r1', 'r2'], ['r3', 'r4']]);
  });

  it('with maxDeltaMv makes the most pairs under the cap, then the smallest total', () => {
    const readings = [0.600, 0.6005, 0.603, 0.620].map((vf, i) => ({ id: `r${i}`, vf }));
    const out = matchPairs({ readings, pairs: 2, objective: 'sum', maxDeltaMv: 1 });
    expect(out.pairs).toEqual([{ a: 'r0', b: 'r1', deltaMv: 0.5 }]);
    expect(out.unused).toEqual(['r2', 'r3']);
    // A pair of exactly the cap is allowed.
    expect(matchPairs({ readings, pairs: 1, objective: 'sum', maxDeltaMv: 0.5 }).pairs).toHaveLength(1);
  });
});

describe('cross assignment (Hungarian method)', () => {
  const permutations = (n: number): number[][] => n === 0 ? [[]] : permutations(n - 1).flatMap((p) => Array.from({ length: n }, (_, i) => [...p.slice(0, i), n - 1, ...p.slice(i)]));
  it('equals the best of every assignment on 200 random matrices up to 6 × 7', () => {
    const rnd = mulberry32(7);
    for (let t = 0; t < 200; t++) {
      const n = 1 + (t % 6);
      const m = n + (t % 2);
      const cost = Array.from({ length: n }, () => Array.from({ length: m }, () => Math.round(rnd() * 100) / 10));
      const got = minCostAssignment(cost);
      expect(new Set(got).size).toBe(n);
      const gotCost = got.reduce((s, j, i) => s + cost[i][j], 0);
      // Brute force over columns: every injective map rows → columns (permutations of m, first n).
      let best = Infinity;
      for (const p of permutations(m)) best = Math.min(best, p.slice(0, n).reduce((s, j, i) => s + cost[i][j], 0));
      expect(gotCost).toBeCloseTo(best, 9);
    }
  });
});

describe('string split', () => {
  it('keeps the two strings’ summed Vf within the largest adjacent-pair gap (the stated bound)', () => {
    const rnd = mulberry32(11);
    for (let t = 0; t < 200; t++) {
      const n = 2 * (1 + (t % 4));
      const block = Array.from({ length: n }, () => 0.59 + rnd() * 0.02).sort((a, b) => a - b);
      const s = splitBlock(block);
      const sum = (ix: number[]) => ix.reduce((a, i) => a + block[i], 0);
      expect(s.positive).toHaveLength(n / 2);
      expect(Math.abs(sum(s.positive) - sum(s.negative))).toBeCloseTo(s.differenceV, 12);
      let largestGap = 0;
      for (let i = 0; i + 1 < n; i += 2) largestGap = Math.max(largestGap, block[i + 1] - block[i]);
      expect(s.differenceV).toBeLessThanOrEqual(largestGap + 1e-15);
    }
  });
});

describe('npm run --silent match (the checking contract)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'kneepoint-match-'));
  function cli(name: string, body: unknown) {
    const file = join(dir, name);
    writeFileSync(file, typeof body === 'string' ? body : JSON.stringify(body));
    const r = spawnSync('npm', ['run', '--silent', 'match', '--', file], { encoding: 'utf8', cwd: process.cwd() });
    const lines = r.stdout.trim().split('\n');
    expect(lines.length).toBe(1);
    return { status: r.status, json: JSON.parse(lines[0]) as Record<string, unknown> };
  }

  it('prints exactly what the product function gives', () => {
    const input = { readings: randomTray(5, 20), pairs: 6, objective: 'max', maxDeltaMv: 2 };
    const r = cli('ok.json', input);
    expect(r.status).toBe(0);
    expect(r.json).toEqual(JSON.parse(JSON.stringify(runMatch(input))));
    expect(Object.keys(r.json).sort()).toEqual(['pairs', 'totalDeltaMv', 'unused', 'worstDeltaMv']);
  });

  it('refuses bad input with exit code 2 and {error: {message, path}}', () => {
    const good = [{ id: 'A', vf: 0.6 }, { id: 'B', vf: 0.601 }];
    const cases: [string, unknown, string][] = [
      ['negative', { readings: [{ id: 'A', vf: -0.6 }, good[1]], pairs: 1 }, 'readings[0].vf'],
      ['missing', { readings: [good[0], { id: 'B' }], pairs: 1 }, 'readings[1].vf'],
      ['duplicate', { readings: [good[0], { id: 'A', vf: 0.7 }], pairs: 1 }, 'readings[1].id'],
      ['k0', { readings: good, pairs: 0 }, 'pairs'],
      ['objective', { readings: good, pairs: 1, objective: 'median' }, 'objective'],
    ];
    for (const [name, body, path] of cases) {
      const r = cli(`${name}.json`, body);
      expect(r.status, name).toBe(2);
      expect(r.json, name).toEqual({ error: { message: expect.any(String), path } });
    }
    const broken = cli('broken.json', '{"readings": [');
    expect(broken.status).toBe(2);
  });
});

describe('engine-costed cross pairing', () => {
  // Silicon one way, a red LED the other, on a shunt clipper after a 1…200 audio-taper drive (demo values).
  const circuit = resolveCircuit(optionCircuit(
    { minGain: 1, maxGain: 200, taper: 'audio', inputPeakV: 0.1, supplyV: 9, referenceDrive: 0.5 },
    { topology: 'shunt', network: { seriesOhms: 2200, shuntFarads: 10e-9 }, positive: [findPreset('si-small-signal')!.model], negative: [findPreset('led-red')!.model] },
  ));
  const h2At = engineH2(circuit, 1e-3);
  const rnd = mulberry32(3);
  const pool = (prefix: string, n: number, centre: number, width: number) =>
    Array.from({ length: n }, (_, i) => ({ id: `${prefix}-${i + 1}`, vf: centre + (rnd() - 0.5) * width }));

  it('reads H2 from the interpolated grid within 0.3 dB of direct engine solves', () => {
    const pos = pool('P', 12, 0.585, 0.03);
    const neg = pool('N', 12, 1.65, 0.12);
    const table = h2Table(h2At, pos.map((r) => r.vf), neg.map((r) => r.vf));
    for (let t = 0; t < 6; t++) {
      const p = pos[t * 2].vf;
      const n = neg[11 - t].vf;
      expect(Math.abs(table(p, n) - h2At([p], [n]))).toBeLessThan(0.3);
    }
  });

  it('finds the pairs closest to the target H2 exactly on small trays (against every assignment)', () => {
    const pos = pool('P', 4, 0.585, 0.03);
    const neg = pool('N', 5, 1.65, 0.12);
    const target = h2At([0.585], [1.65]);
    const got = crossMatch(pos, neg, 3, h2At, target);
    const total = got.reduce((s, p) => s + p.offDb, 0);
    // Every way to give 3 of the 4 positives distinct negatives.
    const off = pos.map((p) => neg.map((n) => Math.abs(h2At([p.vf], [n.vf]) - target)));
    let best = Infinity;
    for (let a = 0; a < 4; a++) for (let b = 0; b < 4; b++) for (let c = 0; c < 4; c++) {
      if (new Set([a, b, c]).size < 3) continue;
      for (let x = 0; x < 5; x++) for (let y = 0; y < 5; y++) for (let z = 0; z < 5; z++) {
        if (new Set([x, y, z]).size < 3) continue;
        best = Math.min(best, off[a][x] + off[b][y] + off[c][z]);
      }
    }
    expect(got).toHaveLength(3);
    expect(total).toBeCloseTo(best, 9);
  });
});
