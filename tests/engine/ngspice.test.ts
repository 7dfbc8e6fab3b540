import { beforeAll, describe, it, expect } from 'vitest';
import { analyse, analyseOperatingPoint, validateContractInput } from '../../shared/engine/index';
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

describe('agreement with ngspice', () => {
  beforeAll(() => requireNgspice());
  for (const [name, json] of circuits) {
    it(name, () => {
      const input = validateContractInput(json);
      const engine = analyseOperatingPoint(input);
      const spice = analyse(runNgspice(input, { samples: 1024 }).samples, input.harmonics);
      expect(Math.abs(toDb(engine.fundamentalPeakV) - toDb(spice.fundamentalPeakV))).toBeLessThan(0.3);
      let compared = 0;
      for (let k = 2; k <= input.harmonics; k++) {
        const ref = spice.harmonics[k - 1].dbc;
        const got = engine.harmonics[k - 1].dbc;
        if (ref > -40) { expect(Math.abs(got - ref), `H${k}`).toBeLessThan(0.3); compared++; }
        else if (ref > -60) { expect(Math.abs(got - ref), `H${k}`).toBeLessThan(1); compared++; }
      }
      expect(compared).toBeGreaterThan(0);
      expect(Math.abs(engine.thdF / spice.thdF - 1)).toBeLessThan(0.02);
      expect(Math.abs(engine.dcV - spice.dcV)).toBeLessThan(Math.max(2e-3, 0.02 * spice.fundamentalPeakV));
    });
  }
});
