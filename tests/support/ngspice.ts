// Outside check: the same contract JSON as a SPICE netlist, simulated by ngspice (Debian package `ngspice`),
// sampled over its last steady-state period. Nothing ngspice prints is ever stored as truth.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyse, type ContractInput, type DeviceModel, type Spectrum } from '../../shared/engine/index';

export const NGSPICE = process.env.NGSPICE ?? 'ngspice';

/** Throws a clear error when ngspice is missing: the checks must fail, never skip. */
export function requireNgspice(): void {
  const r = spawnSync(NGSPICE, ['--version'], { encoding: 'utf8' });
  if (r.error || r.status !== 0) {
    throw new Error(`ngspice is required for the outside checks but "${NGSPICE} --version" failed `
      + `(${r.error?.message ?? `exit ${r.status}`}). Install the Debian package ngspice (the test bootstrap does this).`);
  }
}

export interface NgspiceOptions {
  /** Samples of the output over the last period (power of two). */
  samples?: number;
  /** Periods simulated before the one that is kept; default from the network's time constant. */
  settlePeriods?: number;
}

function num(x: number): string {
  return x.toExponential(12);
}

function model(name: string, d: DeviceModel): string {
  // No junction capacitance, transit time or breakdown: the engine models the DC law only.
  const extra = `${d.eg !== undefined ? ` EG=${num(d.eg)}` : ''}${d.xti !== undefined ? ` XTI=${num(d.xti)}` : ''}`;
  return `.model ${name} D(IS=${num(d.is)} N=${num(d.n)} RS=${num(d.rs)} CJO=0 TT=0${extra})`;
}

/** A device string from node `from` (anode end) to node `to`, as SPICE lines. */
function stringLines(prefix: string, devices: readonly DeviceModel[], from: string, to: string, models: string[]): string[] {
  const lines: string[] = [];
  devices.forEach((d, i) => {
    const name = `DM${prefix}${i}`;
    models.push(model(name, d));
    const a = i === 0 ? from : `${prefix}${i}`;
    const k = i === devices.length - 1 ? to : `${prefix}${i + 1}`;
    lines.push(`D${prefix}${i} ${a} ${k} ${name}`);
  });
  return lines;
}

function timeConstant(input: ContractInput): number {
  const c = input.clipper;
  if (c.topology === 'shunt') return c.seriesOhms * c.shuntFarads;
  if (c.topology === 'feedback') return c.feedbackOhms * c.feedbackFarads;
  return 0;
}

/** The SPICE netlist for a contract input, writing the kept period's v(out) to dataFile. */
export function netlist(input: ContractInput, dataFile: string, options: NgspiceOptions = {}): string {
  const n = options.samples ?? 1024;
  const period = 1 / input.toneHz;
  const settle = options.settlePeriods ?? Math.max(2, Math.ceil((15 * timeConstant(input)) / period) + 1);
  const stop = (settle + 1) * period;
  const step = period / n;
  const c = input.clipper;
  const models: string[] = [];
  const gain = num(input.driveGain);
  const drive = input.railPeakV === null
    ? `Bdrive d 0 V = ${gain}*V(in)`
    : `Bdrive d 0 V = max(min(${gain}*V(in), ${num(input.railPeakV)}), -${num(input.railPeakV)})`;
  const lines = [
    '* kneepoint engine check',
    // RSHUNT: 10 GΩ from every node to ground (≤ 1e-5 of any current here) gives the floating node
    // inside a reverse-biased string a defined voltage; without it ngspice's time step collapses.
    `.options TEMP=${num(input.temperatureC)} TNOM=27 RELTOL=1e-6 ABSTOL=1e-14 VNTOL=1e-9 RSHUNT=1e10`,
    `Vin in 0 SIN(0 ${num(input.inputPeakV)} ${num(input.toneHz)})`,
    drive,
  ];
  if (c.topology === 'shunt') {
    lines.push(`Rser d out ${num(c.seriesOhms)}`);
    if (c.shuntFarads > 0) lines.push(`Cshunt out 0 ${num(c.shuntFarads)}`);
    lines.push(...stringLines('p', c.positive, 'out', '0', models), ...stringLines('n', c.negative, '0', 'out', models));
  } else if (c.topology === 'feedback') {
    // Exact equivalent of the ideal non-inverting op-amp: the inverting input sits at v(d), so Rg draws
    // v(d)/Rg, all of which flows through the feedback network; node u is that network's output end
    // referred to the inverting input, and out = v(d) + v(u). (A VCVS of huge gain leaves ngspice
    // stranded on the floating node inside a reverse-biased string when no capacitor is present.)
    lines.push(`Binj 0 u I = V(d)/${num(c.groundOhms)}`, `Rf u 0 ${num(c.feedbackOhms)}`);
    if (c.feedbackFarads > 0) lines.push(`Cf u 0 ${num(c.feedbackFarads)}`);
    lines.push(...stringLines('p', c.positive, 'u', '0', models), ...stringLines('n', c.negative, '0', 'u', models));
    lines.push('Bout out 0 V = V(d) + V(u)');
  } else {
    lines.push('Rbuf d out 1', 'Rload out 0 1e12');
  }
  lines.push(...models,
    '.control',
    'set wr_singlescale',
    `tran ${num(step)} ${num(stop)} ${num(stop - period)} ${num(step / 4)}`,
    'linearize v(out)',
    `wrdata ${dataFile} v(out)`,
    'quit',
    '.endc',
    '.end');
  return `${lines.join('\n')}\n`;
}

export interface NgspiceRun {
  /** One steady-state period of v(out), `samples` points. */
  samples: Float64Array;
  /** Whole-process wall time of ngspice, ms. */
  elapsedMs: number;
}

/** Simulate a contract input in ngspice (batch mode) and return its last period of output. */
export function runNgspice(input: ContractInput, options: NgspiceOptions = {}): NgspiceRun {
  const n = options.samples ?? 1024;
  const dir = mkdtempSync(join(tmpdir(), 'kneepoint-spice-'));
  try {
    const data = join(dir, 'out.txt');
    const cir = join(dir, 'check.cir');
    writeFileSync(cir, netlist(input, data, options));
    const t0 = performance.now();
    const r = spawnSync(NGSPICE, ['-b', cir], { encoding: 'utf8', timeout: 120_000 });
    const elapsedMs = performance.now() - t0;
    if (r.error) throw new Error(`ngspice did not run: ${r.error.message}`);
    let text: string;
    try {
      text = readFileSync(data, 'utf8');
    } catch {
      throw new Error(`ngspice wrote no data (exit ${r.status}):\n${r.stdout}\n${r.stderr}`);
    }
    const values = text.trim().split('\n').map((line) => Number(line.trim().split(/\s+/)[1]));
    if (values.length < n || values.some((v) => !Number.isFinite(v))) {
      throw new Error(`ngspice output has ${values.length} points, expected ≥ ${n}`);
    }
    return { samples: Float64Array.from(values.slice(0, n)), elapsedMs };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Harmonic spectrum of ngspice's steady-state period for a contract input (the outside expectation). */
export function ngspiceSpectrum(input: ContractInput, samples = 1024): Spectrum {
  return analyse(runNgspice(input, { samples }).samples, input.harmonics);
}

/** Forward voltage of one device at a DC current and temperature, from ngspice's operating point. */
export function ngspiceForwardVoltage(d: DeviceModel, currentA: number, temperatureC = 27): number {
  const dir = mkdtempSync(join(tmpdir(), 'kneepoint-spice-'));
  try {
    const cir = join(dir, 'vf.cir');
    writeFileSync(cir, [
      '* kneepoint forward voltage check',
      `.options TEMP=${num(temperatureC)} TNOM=27 RELTOL=1e-9 ABSTOL=1e-15 VNTOL=1e-12`,
      `I1 0 a DC ${num(currentA)}`,
      'D1 a 0 DM',
      model('DM', d),
      '.control', 'op', 'print v(a)', 'quit', '.endc', '.end', '',
    ].join('\n'));
    const r = spawnSync(NGSPICE, ['-b', cir], { encoding: 'utf8', timeout: 60_000 });
    const m = /v\(a\)\s*=\s*([-+0-9.eE]+)/.exec(r.stdout ?? '');
    if (!m) throw new Error(`ngspice printed no v(a) (exit ${r.status}):\n${r.stdout}\n${r.stderr}`);
    return Number(m[1]);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
