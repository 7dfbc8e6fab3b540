// Engine section of `npm run bench`: engine time per operating point, per full profile and per
// Monte Carlo, against ngspice's whole-process time on the same circuits. Prints figures only.
import { readFileSync } from 'node:fs';
import {
  DRAW_SAMPLING, analyse, analyseOperatingPoint, computeProfile, gainAtDrive, monteCarlo, validateContractInput,
  type CircuitSpec, type ContractInput, type Spectrum,
} from '../../shared/engine/index';
import { requireNgspice, runNgspice } from '../../tests/support/ngspice';

export interface BenchSection {
  /** Word that selects the section on the command line, e.g. `npm run bench -- engine`. */
  key: string;
  name: string;
  run: () => void | Promise<void>;
}

const SILICON = { preset: 'si-small-signal' };

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Wall and CPU time of one measurement, ms. CPU time is what the figure would be on an idle machine. */
interface Timing {
  wall: number;
  cpu: number;
}

/** Median wall and CPU time of fn in ms over enough repetitions to fill about budgetMs (after a warm-up). */
function time(fn: () => unknown, budgetMs = 400, minReps = 5): Timing {
  // Warm up by time, not by count: on a busy machine the optimising compiler needs a while to catch up.
  const warm = performance.now();
  for (let i = 0; i < 3 || performance.now() - warm < 300; i++) fn();
  const wall: number[] = [];
  const cpu: number[] = [];
  const start = performance.now();
  while (wall.length < minReps || performance.now() - start < budgetMs) {
    const c = process.cpuUsage();
    const t = performance.now();
    fn();
    wall.push(performance.now() - t);
    const used = process.cpuUsage(c);
    cpu.push((used.user + used.system) / 1000);
    if (wall.length > 5000) break;
  }
  return { wall: median(wall), cpu: median(cpu) };
}

/** CPU time of this process's finished children so far, ms (Linux /proc; clock ticks of 10 ms). */
export function childCpuMs(): number {
  try {
    const stat = readFileSync('/proc/self/stat', 'utf8');
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    // After the command name: cutime and cstime are fields 16 and 17 of the whole line (13 and 14 here).
    return ((Number(f[13]) + Number(f[14])) * 1000) / 100;
  } catch {
    return NaN;
  }
}

/** ngspice on one input, reps whole processes: median wall ms, mean CPU ms. */
function spiceTime(input: ContractInput, reps: number): { timing: Timing; samples: Float64Array } {
  const c0 = childCpuMs();
  const runs = Array.from({ length: reps }, () => runNgspice(input));
  return { timing: { wall: median(runs.map((r) => r.elapsedMs)), cpu: (childCpuMs() - c0) / reps }, samples: runs[0].samples };
}

/** Worst harmonic difference (above −60 dBc) and THD_F difference of an engine spectrum against ngspice's samples. */
function agreement(got: Spectrum, spiceSamples: Float64Array, harmonics: number): string {
  const ref = analyse(spiceSamples, harmonics);
  let worst = 0;
  for (let k = 1; k <= harmonics; k++) {
    if (ref.harmonics[k - 1].dbc > -60) worst = Math.max(worst, Math.abs(got.harmonics[k - 1].dbc - ref.harmonics[k - 1].dbc));
  }
  return `worst ${worst.toFixed(3)} dB, THD_F ${(100 * Math.abs(got.thdF / ref.thdF - 1)).toFixed(3)} % rel`;
}

const fmt = (x: number, d = 3): string => x.toFixed(d).padStart(9);

function row(label: string, engine: Timing, spice?: Timing, note = ''): void {
  const ratio = spice === undefined ? ''
    : `${fmt(spice.wall, 1)} ms ${fmt(spice.cpu, 1)} ms ${fmt(spice.wall / engine.wall, 0)}× ${fmt(spice.cpu / engine.cpu, 0)}×`;
  console.log(`  ${label.padEnd(42)} ${fmt(engine.wall)} ms ${fmt(engine.cpu)} ms ${ratio}  ${note}`);
}

function contract(clipper: Record<string, unknown>, driveGain: number): ContractInput {
  return validateContractInput({ toneHz: 1000, inputPeakV: 0.1, driveGain, railPeakV: 3, harmonics: 10, clipper });
}

function profileSpec(clipper: Record<string, unknown>): CircuitSpec {
  return { clipper, drive: { minGain: 1, maxGain: 200, taper: 'log', inputPeakV: 0.1, railPeakV: 3 } };
}

function runEngineBench(): void {
  requireNgspice();
  const shuntStatic = { topology: 'shunt', seriesOhms: 2200, positive: [SILICON], negative: [SILICON, SILICON] };
  const shuntCap = { ...shuntStatic, shuntFarads: 10e-9 };
  const feedbackStatic = { topology: 'feedback', feedbackOhms: 100000, groundOhms: 4700, positive: [SILICON], negative: [{ preset: 'led-red' }] };
  const feedbackCap = { ...feedbackStatic, feedbackFarads: 1e-9 };

  console.log('\nHarmonic engine (median times; ngspice = whole process `ngspice -b`, same circuit; CPU ratio is robust to machine load)');
  console.log(`  ${''.padEnd(42)} ${'engine wall'.padStart(12)} ${'engine cpu'.padStart(12)} ${'ngspice wall'.padStart(12)} ${'cpu'.padStart(12)} ${'ratio wall'.padStart(10)} ${'cpu'.padStart(10)}  agreement`);
  const ops: [string, ContractInput][] = [
    ['operating point, shunt, static', contract(shuntStatic, 20)],
    ['operating point, feedback, static', contract(feedbackStatic, 5)],
    ['operating point, shunt, 10 nF', contract(shuntCap, 20)],
    ['operating point, feedback, 1 nF', contract(feedbackCap, 5)],
  ];
  for (const [label, input] of ops) {
    const engine = time(() => analyseOperatingPoint(input));
    const s = spiceTime(input, 3);
    row(label, engine, s.timing, agreement(analyseOperatingPoint(input), s.samples, input.harmonics));
  }

  for (const [label, clipper] of [['full profile (25-point sweep), shunt, static', shuntStatic], ['full profile (25-point sweep), shunt, 10 nF', shuntCap]] as const) {
    const spec = profileSpec(clipper);
    const engine = time(() => computeProfile(spec), 1500, 5);
    // ngspice has no sweep of its own here: the same 25 drive settings plus the reference point, one process each.
    const total: Timing = { wall: 0, cpu: 0 };
    for (let i = 0; i <= 25; i++) {
      const drive = i === 25 ? 0.5 : i / 24;
      const t = spiceTime(contract(clipper, gainAtDrive(spec.drive, drive)), 1).timing;
      total.wall += t.wall; total.cpu += t.cpu;
    }
    row(label, engine, total);
  }
  for (const [label, clipper] of [['Monte Carlo, 200 draws, shunt, static', shuntStatic], ['Monte Carlo, 200 draws, shunt, 10 nF', shuntCap]] as const) {
    const spec = profileSpec(clipper);
    const engine = time(() => monteCarlo(spec, { draws: 200, seed: 1 }), 1500, 3);
    // ngspice: 200 × one run of the nominal circuit; agreement of the draws' sampling on that circuit.
    const input = contract(clipper, gainAtDrive(spec.drive, 0.5));
    const s = spiceTime(input, 3);
    const sampling = input.clipper.shuntFarads > 0 ? DRAW_SAMPLING : { samples: DRAW_SAMPLING.samples };
    row(label, engine, { wall: 200 * s.timing.wall, cpu: 200 * s.timing.cpu }, agreement(analyseOperatingPoint(input, sampling), s.samples, input.harmonics));
  }
  console.log('  targets: static operating point ≤ 1 ms; full profile ≤ 50 ms; ≥ 50× faster than ngspice; Monte Carlo with a capacitor ≥ 60×');
}

/** The engine's bench section. */
export const engineSection: BenchSection = { key: 'engine', name: 'harmonic engine', run: runEngineBench };
