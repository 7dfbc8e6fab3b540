import { beforeAll, describe, it, expect } from 'vitest';
import {
  DRAW_SAMPLING, analyse, analyseOperatingPoint, monteCarlo, monteCarloDraws, percentile, periodicOutput, validateContractInput,
  type ContractInput, type SamplingOptions, type Spectrum, type StageSetup,
} from '../../shared/engine/index';
import { requireNgspice, runNgspice } from '../support/ngspice';
import { RED_LED, SILICON, feedback, shunt, toDb } from './fixtures';

// Outside check: ngspice (Debian package `ngspice`, a general-purpose circuit simulator) runs the same
// contract JSON as a netlist in this test; its output is never stored. Tolerances from engine.md:
// 0.3 dB above −40 dBc, 1 dB from −40 to −60 dBc, THD_F 2 % relative, DC 2 mV or 2 % of the fundamental.
const GERMANIUM = { preset: 'germanium-point-contact' };
const circuits: [string, Record<string, unknown>][] = [
  ['shunt, symmetric silicon, static, low drive', shunt({ driveGain: 6, railPeakV: null })],
  ['shunt, silicon vs two silicon, static, heavy drive into the rail', shunt({ driveGain: 150 }, { negative: [SILICON, SILICON] })],
  ['shunt, symmetric silicon, 10 nF, moderate drive', shunt({ driveGain: 20 }, { shuntFarads: 10e-9 })],
  ['shunt, silicon vs red LED, 4.7 nF, heavy drive', shunt({ driveGain: 200 }, { shuntFarads: 4.7e-9, negative: [RED_LED] })],
  ['feedback, symmetric silicon, static, low drive', feedback({ driveGain: 1.5 })],
  ['feedback, silicon vs two silicon, 1 nF', feedback({ driveGain: 3 }, { feedbackFarads: 1e-9, negative: [SILICON, SILICON] })],
  ['feedback, red LED vs silicon, static, heavy drive', feedback({ driveGain: 30 }, { positive: [RED_LED] })],
  ['feedback, symmetric silicon, 100 pF, heavy drive', feedback({ driveGain: 30 }, { feedbackFarads: 100e-12 })],
  ['shunt, germanium pair at 50 °C (temperature scaling)', shunt({ driveGain: 10, temperatureC: 50 }, { positive: [GERMANIUM], negative: [GERMANIUM] })],
];

function expectAgreement(engine: Spectrum, spice: Spectrum, harmonics: number): void {
  expect(Math.abs(toDb(engine.fundamentalPeakV) - toDb(spice.fundamentalPeakV))).toBeLessThan(0.3);
  let compared = 0;
  for (let k = 2; k <= harmonics; k++) {
    const ref = spice.harmonics[k - 1].dbc;
    const got = engine.harmonics[k - 1].dbc;
    if (ref > -40) { expect(Math.abs(got - ref), `H${k}`).toBeLessThan(0.3); compared++; }
    else if (ref > -60) { expect(Math.abs(got - ref), `H${k}`).toBeLessThan(1); compared++; }
  }
  expect(compared).toBeGreaterThan(0);
  expect(Math.abs(engine.thdF / spice.thdF - 1)).toBeLessThan(0.02);
  expect(Math.abs(engine.dcV - spice.dcV)).toBeLessThan(Math.max(2e-3, 0.02 * spice.fundamentalPeakV));
}

const hasCap = (input: ContractInput): boolean => input.clipper.shuntFarads > 0 || input.clipper.feedbackFarads > 0;

describe('agreement with ngspice', () => {
  beforeAll(() => requireNgspice());
  for (const [name, json] of circuits) {
    it(name, () => {
      const input = validateContractInput(json);
      const spice = analyse(runNgspice(input, { samples: 1024 }).samples, input.harmonics);
      expectAgreement(analyseOperatingPoint(input), spice, input.harmonics);
      // The Monte Carlo draws' coarser sampling (and, without a capacitor, fewer static points) agrees too.
      const coarse: SamplingOptions = hasCap(input) ? DRAW_SAMPLING : { samples: DRAW_SAMPLING.samples };
      expectAgreement(analyseOperatingPoint(input, coarse), spice, input.harmonics);
    });
  }
});

// Monte Carlo: every device of a draw has its own IS and N, so no string merges identical devices, and the
// draws use DRAW_SAMPLING. Each draw runs in ngspice too; the bands built from ngspice's draws must match.
const drive = { minGain: 1, maxGain: 200, taper: 'log' as const, inputPeakV: 0.1, railPeakV: 3 };
const monteCarloCircuits: [string, Record<string, unknown>][] = [
  ['shunt, silicon vs two silicon, 10 nF', { topology: 'shunt', seriesOhms: 2200, shuntFarads: 10e-9, positive: [SILICON], negative: [SILICON, SILICON] }],
  ['feedback, silicon vs two silicon, 1 nF', { topology: 'feedback', feedbackOhms: 100000, groundOhms: 4700, feedbackFarads: 1e-9, positive: [SILICON], negative: [SILICON, SILICON] }],
];

function asContract(setup: StageSetup): ContractInput {
  return { ...setup, clipper: setup.network, harmonics: 10 };
}

describe('Monte Carlo draws agree with ngspice', () => {
  beforeAll(() => requireNgspice());
  for (const [name, clipper] of monteCarloCircuits) {
    it(name, () => {
      const spec = { clipper, drive };
      const options = { draws: 5, seed: 5 };
      const { draws } = monteCarloDraws(spec, options);
      const h2: number[] = [];
      const h3: number[] = [];
      const thd: number[] = [];
      for (const setup of draws) {
        const [a, b] = setup.network.negative;
        expect(a.is).not.toBe(b.is);
        const spice = analyse(runNgspice(asContract(setup), { samples: 1024 }).samples, 10);
        expectAgreement(analyse(periodicOutput(setup, DRAW_SAMPLING), 10), spice, 10);
        h2.push(spice.harmonics[1].dbc); h3.push(spice.harmonics[2].dbc); thd.push(spice.thdF);
      }
      const bands = monteCarlo(spec, options);
      for (const p of [5, 50, 95] as const) {
        const key = `p${p}` as const;
        expect(Math.abs(bands.h2Dbc[key] - percentile(h2, p)), `H2 ${key}`).toBeLessThan(0.3);
        expect(Math.abs(bands.h3Dbc[key] - percentile(h3, p)), `H3 ${key}`).toBeLessThan(0.3);
        expect(Math.abs(bands.thdF[key] / percentile(thd, p) - 1), `THD_F ${key}`).toBeLessThan(0.02);
      }
    });
  }
});
