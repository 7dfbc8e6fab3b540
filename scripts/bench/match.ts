// Device matching section of `npm run bench` (`npm run bench -- match` alone): the exact pairing of a
// 200-slot tray into 80 pairs (target ≤ 100 ms) and engine-costed cross pairing of 60 silicon × 60 red
// LED readings (target ≤ 2 s), wall and CPU time. Readings are drawn from a seeded generator. Prints figures only.
import { optionCircuit } from '../../shared/catalog/circuit';
import { findPreset, mulberry32, resolveCircuit } from '../../shared/engine/index';
import { crossMatch, engineH2 } from '../../shared/matching/cross';
import { matchPairs } from '../../shared/matching/pairs';
import type { BenchSection } from './engine';

function timed<T>(work: () => T): { value: T; wall: number; cpu: number } {
  const t = performance.now();
  const cpu = process.cpuUsage();
  const value = work();
  const used = process.cpuUsage(cpu);
  return { value, wall: performance.now() - t, cpu: (used.user + used.system) / 1000 };
}
const best = <T>(runs: { value: T; wall: number; cpu: number }[]) => runs.reduce((a, b) => (b.wall < a.wall ? b : a));
const line = (label: string, r: { wall: number; cpu: number }, extra: string) =>
  console.log(`  ${label.padEnd(46)} ${r.wall.toFixed(1).padStart(9)} ms wall, ${r.cpu.toFixed(1)} ms CPU  ${extra}`);

function run(): void {
  console.log('\nDevice matching — exact pairs (target ≤ 100 ms) and engine-costed cross pairs (target ≤ 2 s)');
  const rnd = mulberry32(12);
  const tray = Array.from({ length: 200 }, (_, i) => ({ id: `T1-${i + 1}`, vf: 0.58 + rnd() * 0.03 }));
  for (const objective of ['sum', 'max'] as const) {
    matchPairs({ readings: tray, pairs: 80, objective }); // warm-up
    const r = best(Array.from({ length: 5 }, () => timed(() => matchPairs({ readings: tray, pairs: 80, objective }))));
    line(`200 slots → 80 pairs, "${objective}" (best of 5)`, r, `total ${r.value.totalDeltaMv.toFixed(2)} mV, worst ${r.value.worstDeltaMv.toFixed(3)} mV`);
  }
  const circuit = resolveCircuit(optionCircuit(
    { minGain: 1, maxGain: 200, taper: 'audio', inputPeakV: 0.1, supplyV: 9, referenceDrive: 0.5 },
    { topology: 'shunt', network: { seriesOhms: 2200, shuntFarads: 10e-9 }, positive: [findPreset('si-small-signal')!.model], negative: [findPreset('led-red')!.model] },
  ));
  const h2At = engineH2(circuit, 1e-3);
  const silicon = Array.from({ length: 60 }, (_, i) => ({ id: `T2-${i + 1}`, vf: 0.575 + rnd() * 0.02 }));
  const leds = Array.from({ length: 60 }, (_, i) => ({ id: `T3-${i + 1}`, vf: 1.6 + rnd() * 0.1 }));
  const target = h2At([0.585], [1.65]);
  h2At([0.58], [1.62]); // warm-up
  const r = best(Array.from({ length: 2 }, () => timed(() => crossMatch(silicon, leds, 60, h2At, target))));
  const off = r.value.map((p) => p.offDb);
  line('60 × 60 cross pairs on engine H2 (best of 2)', r, `${r.value.length} pairs, mean ${(off.reduce((a, b) => a + b, 0) / off.length).toFixed(3)} dB, worst ${Math.max(...off).toFixed(3)} dB off ${target.toFixed(1)} dBc`);
}

export const matchSection: BenchSection = { key: 'match', name: 'device matching', run };
