// Matching a batch's units to measured tray slots: the plan the product proposes (pure; the server
// runs it in the compute pool, the benchmark directly). Per clipping option:
//   pairs          symmetric, one device a side: matchPairs (exact, the `npm run match` function)
//   strings        symmetric, n devices of a kind a side: K blocks of 2n consecutive sorted readings with
//                  the least total spread (exact for that choice), each split by splitBlock — a heuristic
//                  whose string sums differ by at most the block's largest adjacent gap (strings.ts)
//   cross          asymmetric, one device a side from different devices: crossMatch on engine H2 (exact
//                  assignment on the grid cost, cross.ts)
//   cross-strings  asymmetric strings of one device kind (e.g. two against one): K blocks of p + q
//                  consecutive readings with the least spread, then the split of each block whose engine
//                  H2 is closest to the option's nominal (heuristic: every device of a unit lies within
//                  its block's spread; the split is the best of all C(p+q, p) for that block)
// Options draw from the pools in the order given; what one takes the next cannot. The gain is the
// predicted H2 of the matched units against random pairing of the same readings (seeded draws).
import { forwardVoltage, mulberry32, resolveCircuit, type CircuitSpec, type DeviceModel } from '../engine/index';
import { crossMatch, engineH2 } from './cross';
import { chooseBlocks } from './groups';
import { matchPairs, roundMv, sortReadings, type Reading } from './pairs';
import { splitBlock } from './strings';

export interface PlanDevice { optionDeviceId: number; side: 'positive' | 'negative'; position: number; deviceId: number; model: DeviceModel }
export interface PlanOption { optionId: number; spec: CircuitSpec; devices: PlanDevice[]; unitIds: number[] }
export interface PlanInput { options: PlanOption[]; pools: { deviceId: number; readings: Reading[] }[]; testCurrentA: number; randomDraws?: number; seed?: number }

export type PlanMethod = 'pairs' | 'strings' | 'cross' | 'cross-strings' | 'none';
export interface H2Summary { meanDbc: number; minDbc: number; maxDbc: number; spreadDb: number; meanOffDb: number }
export interface PlannedUnit { unitId: number; optionId: number; slots: { optionDeviceId: number; readingId: string; vf: number }[]; mismatchMv: number; h2Dbc: number }
export interface PlanOutput {
  options: { optionId: number; method: PlanMethod; units: number; matched: number; nominalH2Dbc: number; matchedH2: H2Summary | null; randomH2: H2Summary | null; note: string }[];
  units: PlannedUnit[];
  unmatched: { unitId: number; reason: string }[];
  leftovers: { deviceId: number; readingIds: string[] }[];
}

/** Most positions of one split tried per block (C(12, 6) = 924). */
const MAX_SPLITS = 924;

function summary(h2: number[], nominal: number): H2Summary | null {
  if (!h2.length) return null;
  const min = Math.min(...h2);
  const max = Math.max(...h2);
  return { meanDbc: h2.reduce((a, b) => a + b, 0) / h2.length, minDbc: min, maxDbc: max, spreadDb: max - min, meanOffDb: h2.reduce((a, b) => a + Math.abs(b - nominal), 0) / h2.length };
}

/** Every way to choose k of n indices, in lexicographic order. */
function combinations(n: number, k: number): number[][] {
  const out: number[][] = [];
  const walk = (start: number, acc: number[]) => {
    if (out.length >= MAX_SPLITS) return;
    if (acc.length === k) { out.push([...acc]); return; }
    for (let i = start; i < n; i++) { acc.push(i); walk(i + 1, acc); acc.pop(); }
  };
  walk(0, []);
  return out;
}

function classify(devices: PlanDevice[]): PlanMethod {
  const pos = devices.filter((d) => d.side === 'positive').map((d) => d.deviceId);
  const neg = devices.filter((d) => d.side === 'negative').map((d) => d.deviceId);
  if (!pos.length || !neg.length) return 'none';
  const same = pos.length === neg.length && [...pos].sort().join() === [...neg].sort().join();
  if (same) return pos.length === 1 ? 'pairs' : 'strings';
  if (pos.length === 1 && neg.length === 1) return 'cross';
  if (new Set([...pos, ...neg]).size === 1) return 'cross-strings';
  return 'none';
}

export function planBatchMatching(input: PlanInput): PlanOutput {
  const pools = new Map(input.pools.map((p) => [p.deviceId, sortReadings(p.readings)]));
  const take = (deviceId: number, ids: Set<string>) => pools.set(deviceId, (pools.get(deviceId) ?? []).filter((r) => !ids.has(r.id)));
  const rnd = mulberry32(input.seed ?? 1);
  const draws = input.randomDraws ?? 3;
  const out: PlanOutput = { options: [], units: [], unmatched: [], leftovers: [] };

  for (const option of input.options) {
    const devices = [...option.devices].sort((a, b) => (a.side === b.side ? a.position - b.position : a.side === 'positive' ? -1 : 1));
    const positive = devices.filter((d) => d.side === 'positive');
    const negative = devices.filter((d) => d.side === 'negative');
    const circuit = resolveCircuit(option.spec);
    const h2At = engineH2(circuit, input.testCurrentA);
    // The option's nominal H2: every device at its model's own Vf (refitting from it changes nothing).
    const nominalH2 = h2At(circuit.network.positive.map((m) => forwardVoltage(m, input.testCurrentA)), circuit.network.negative.map((m) => forwardVoltage(m, input.testCurrentA)));
    const method = classify(devices);
    const k = option.unitIds.length;
    // Readings this option could use, before it takes any: the random baseline draws from these.
    const available = new Map(devices.map((d) => [d.deviceId, [...(pools.get(d.deviceId) ?? [])]]));
    // Each planned unit: readings per option device, in `devices` order.
    const planned: Reading[][] = [];
    let note = '';

    if (method === 'pairs') {
      const deviceId = positive[0].deviceId;
      const pool = pools.get(deviceId) ?? [];
      const r = matchPairs({ readings: pool, pairs: k, objective: 'sum' });
      const byId = new Map(pool.map((x) => [x.id, x]));
      for (const p of r.pairs) planned.push([byId.get(p.a)!, byId.get(p.b)!]);
      take(deviceId, new Set(r.pairs.flatMap((p) => [p.a, p.b])));
      note = 'Pairs with the smallest total Vf difference (exact).';
    } else if (method === 'strings') {
      // Per device kind: blocks of 2c readings (c of that kind on each side), split into two strings.
      const kinds = [...new Set(positive.map((d) => d.deviceId))];
      const perKind = kinds.map((deviceId) => {
        const c = positive.filter((d) => d.deviceId === deviceId).length;
        const pool = pools.get(deviceId) ?? [];
        const { starts } = chooseBlocks(pool.map((x) => x.vf), 2 * c, k, 'sum');
        return { deviceId, blocks: starts.map((s) => {
          const block = pool.slice(s, s + 2 * c);
          const split = splitBlock(block.map((x) => x.vf));
          return { pos: split.positive.map((i) => block[i]), neg: split.negative.map((i) => block[i]) };
        }) };
      });
      const count = Math.min(...perKind.map((p) => p.blocks.length));
      for (let u = 0; u < count; u++) {
        const cursor = new Map(perKind.map((p) => [p.deviceId, { pos: [...p.blocks[u].pos], neg: [...p.blocks[u].neg] }]));
        planned.push(devices.map((d) => { const c = cursor.get(d.deviceId)!; return (d.side === 'positive' ? c.pos : c.neg).shift()!; }));
      }
      for (const p of perKind) take(p.deviceId, new Set(p.blocks.slice(0, count).flatMap((b) => [...b.pos, ...b.neg].map((x) => x.id))));
      note = 'Strings from runs of neighbouring readings, split so both sides sum alike (within the run’s largest step).';
    } else if (method === 'cross') {
      const pairs = crossMatch(pools.get(positive[0].deviceId) ?? [], pools.get(negative[0].deviceId) ?? [], k, h2At, nominalH2);
      for (const p of pairs) planned.push([p.positive, p.negative]);
      take(positive[0].deviceId, new Set(pairs.map((p) => p.positive.id)));
      take(negative[0].deviceId, new Set(pairs.map((p) => p.negative.id)));
      note = 'Cross pairs whose predicted H2 is closest to the option’s nominal (exact assignment).';
    } else if (method === 'cross-strings') {
      const deviceId = positive[0].deviceId;
      const pool = pools.get(deviceId) ?? [];
      const size = devices.length;
      const { starts } = chooseBlocks(pool.map((x) => x.vf), size, k, 'sum');
      const splits = combinations(size, positive.length);
      for (const s of starts) {
        const block = pool.slice(s, s + size);
        let best: { pos: Reading[]; neg: Reading[]; off: number } | null = null;
        for (const chosen of splits) {
          const pos = chosen.map((i) => block[i]);
          const neg = block.filter((_, i) => !chosen.includes(i));
          const off = Math.abs(h2At(pos.map((x) => x.vf), neg.map((x) => x.vf)) - nominalH2);
          if (!best || off < best.off) best = { pos, neg, off };
        }
        planned.push([...best!.pos, ...best!.neg]);
      }
      take(deviceId, new Set(planned.flat().map((x) => x.id)));
      note = 'Runs of neighbouring readings, each split the way whose predicted H2 is closest to the option’s nominal.';
    } else {
      note = 'This option’s devices are not matched automatically: enter each unit’s Vf by hand.';
    }

    const h2Of = (readings: Reading[]) => h2At(readings.slice(0, positive.length).map((x) => x.vf), readings.slice(positive.length).map((x) => x.vf));
    const matchedH2: number[] = [];
    planned.forEach((readings, i) => {
      const unitId = option.unitIds[i];
      const h2 = h2Of(readings);
      matchedH2.push(h2);
      const sum = (side: 'positive' | 'negative') => readings.reduce((a, x, j) => a + (devices[j].side === side ? x.vf : 0), 0);
      out.units.push({
        unitId, optionId: option.optionId, h2Dbc: h2,
        slots: readings.map((x, j) => ({ optionDeviceId: devices[j].optionDeviceId, readingId: x.id, vf: x.vf })),
        // Symmetric options: the two strings' summed Vf apart; asymmetric ones have no such target.
        mismatchMv: method === 'pairs' || method === 'strings' ? roundMv(Math.abs(sum('positive') - sum('negative')) * 1000) : 0,
      });
    });
    for (const unitId of option.unitIds.slice(planned.length)) {
      out.unmatched.push({ unitId, reason: method === 'none' ? note : 'Not enough measured devices left on the trays' });
    }
    // Random pairing of the same readings: each draw shuffles what was available and fills the same units.
    const randomH2: number[] = [];
    if (planned.length) {
      for (let d = 0; d < draws; d++) {
        const shuffled = new Map([...available].map(([id, list]) => {
          const a = [...list];
          for (let i = a.length - 1; i > 0; i--) { const j = Math.floor(rnd() * (i + 1)); [a[i], a[j]] = [a[j], a[i]]; }
          return [id, a];
        }));
        for (let u = 0; u < planned.length; u++) randomH2.push(h2Of(devices.map((dv) => shuffled.get(dv.deviceId)!.shift()!)));
      }
    }
    out.options.push({
      optionId: option.optionId, method, units: k, matched: planned.length, nominalH2Dbc: nominalH2,
      matchedH2: summary(matchedH2, nominalH2), randomH2: summary(randomH2, nominalH2), note,
    });
  }
  out.leftovers = [...pools].map(([deviceId, readings]) => ({ deviceId, readingIds: readings.map((r) => r.id) }));
  return out;
}
