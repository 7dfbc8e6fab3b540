import { shopFormat } from '../../lib/format';

// Units as the bench reads them: mV and V, mA, Ω/kΩ, nF/pF, dBc, %; sensible precision each.
// The digits come from the one formatter, in the shop's locale.
const n = (value: number, decimals: number) => shopFormat().number(value, decimals);
const sig = (value: number) => shopFormat().significant(value, 3);

export const mV = (volts: number) => `${n(volts * 1000, 0)} mV`;
export const volts = (v: number) => `${n(v, 2)} V`;
export const percent = (ratio: number, digits = ratio < 0.1 ? 2 : 1) => `${n(ratio * 100, digits)} %`;
export const dbc = (v: number) => (v <= -200 ? 'below −200 dBc' : `${n(v, 1)} dBc`);
export function ohms(r: number) {
  if (r >= 1e6) return `${sig(r / 1e6)} MΩ`;
  if (r >= 1e3) return `${sig(r / 1e3)} kΩ`;
  return `${sig(r)} Ω`;
}
export function farads(f: number) {
  if (f === 0) return 'none';
  if (f >= 1e-6) return `${sig(f * 1e6)} µF`;
  if (f >= 1e-9) return `${sig(f * 1e9)} nF`;
  return `${sig(f * 1e12)} pF`;
}
export const amps = (a: number) => `${shopFormat().scientific(a, 3)} A`;
export const TOPOLOGY_LABEL = { shunt: 'Shunt (hard, to ground)', feedback: 'Feedback (soft, across the gain resistor)', none: 'No clipper' } as const;
