// Engine section of `npm run bench`: engine time per operating point, per full profile and per
// Monte Carlo, against ngspice's whole-process time on the same circuits. Prints figures only.
import {
  analyse, analyseOperatingPoint, computeProfile, gainAtDrive, monteCarlo, validateContractInput,
  type CircuitSpec, type ContractInput,
} from '../../shared/engine/index';
import { requireNgspice, runNgspice } from '../../tests/support/ngspice';

export interface BenchSection {
  name: string;
  run: () => void | Promise<void>;
}

const SILICON = { preset: 'si-small-signal' };

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** Median wall time of fn in ms over enough repetitions to fill about budgetMs (after a warm-up). */
function time(fn: () => unknown, budgetMs = 400, minReps = 5): number {
  for (let i = 0; i < 3; i++) fn();
  const samples: number[] = [];
  const start = performance.now();
  while (samples.length < minReps || performance.now() - start < budgetMs) {
    const t = performance.now();
    fn();
    samples.push(performance.now() - t);
    if (samples.length > 5000) break;
  }
  return median(samples);
}

function spice(input: ContractInput, reps = 3): { ms: number; worstDb: number; thdRel: number } {
  const runs = Array.from({ length: reps }, () => runNgspice(input));
  const ref = analyse(runs[0].samples, input.harmonics);
  const got = analyseOperatingPoint(input);
  let worst = 0;
  for (let k = 1; k <= input.harmonics; k++) {
    if (ref.harmonics[k - 1].dbc > -60) worst = Math.max(worst, Math.abs(got.harmonics[k - 1].dbc - ref.harmonics[k - 1].dbc));
  }
  return { ms: median(runs.map((r) => r.elapsedMs)), worstDb: worst, thdRel: Math.abs(got.thdF / ref.thdF - 1) };
}

const fmt = (x: number, d = 3): string => x.toFixed(d).padStart(9);

function row(label: string, engineMs: number, spiceMs?: number, note = ''): void {
  const ratio = spiceMs === undefined ? '' : `${fmt(spiceMs, 1)} ms  ${fmt(spiceMs / engineMs, 0)}×`;
  console.log(`  ${label.padEnd(46)} ${fmt(engineMs)} ms  ${ratio}  ${note}`);
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

  console.log('\nHarmonic engine (median wall time; ngspice = whole process `ngspice -b`, same circuit)');
  console.log(`  ${''.padEnd(46)} ${'engine'.padStart(12)}  ${'ngspice'.padStart(12)} ${'ratio'.padStart(10)}  agreement`);
  const ops: [string, ContractInput][] = [
    ['operating point, shunt, static', contract(shuntStatic, 20)],
    ['operating point, feedback, static', contract(feedbackStatic, 5)],
    ['operating point, shunt, 10 nF', contract(shuntCap, 20)],
    ['operating point, feedback, 1 nF', contract(feedbackCap, 5)],
  ];
  for (const [label, input] of ops) {
    const engineMs = time(() => analyseOperatingPoint(input));
    const s = spice(input);
    row(label, engineMs, s.ms, `worst ${s.worstDb.toFixed(3)} dB, THD_F ${(100 * s.thdRel).toFixed(3)} % rel`);
  }

  for (const [label, clipper] of [['full profile (25-point sweep), shunt, static', shuntStatic], ['full profile (25-point sweep), shunt, 10 nF', shuntCap]] as const) {
    const spec = profileSpec(clipper);
    const engineMs = time(() => computeProfile(spec), 1500, 5);
    // ngspice has no sweep of its own here: the same 25 drive settings plus the reference point, one process each.
    let spiceMs = 0;
    for (let i = 0; i <= 25; i++) {
      const drive = i === 25 ? 0.5 : i / 24;
      spiceMs += runNgspice(contract(clipper, gainAtDrive(spec.drive, drive))).elapsedMs;
    }
    row(label, engineMs, spiceMs);
  }
  const mcStatic = time(() => monteCarlo(profileSpec(shuntStatic), { draws: 200, seed: 1 }), 1500, 3);
  row('Monte Carlo, 200 draws, shunt, static', mcStatic, 200 * spice(contract(shuntStatic, gainAtDrive(profileSpec(shuntStatic).drive, 0.5)), 1).ms, '(ngspice: 200 × one run)');
  const mcCap = time(() => monteCarlo(profileSpec(shuntCap), { draws: 200, seed: 1 }), 1500, 3);
  row('Monte Carlo, 200 draws, shunt, 10 nF', mcCap, 200 * spice(contract(shuntCap, gainAtDrive(profileSpec(shuntCap).drive, 0.5)), 1).ms, '(ngspice: 200 × one run)');
  console.log('  targets: static operating point ≤ 1 ms; full profile ≤ 50 ms; ≥ 50× faster than ngspice');
}

/** The engine's bench section. */
export const engineSection: BenchSection = { name: 'harmonic engine', run: runEngineBench };
