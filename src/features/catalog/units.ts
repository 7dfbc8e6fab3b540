// Units as the bench reads them: mV and V, mA, Ω/kΩ, nF/pF, dBc, %; sensible precision each.
export const mV = (volts: number) => `${(volts * 1000).toFixed(0)} mV`;
export const volts = (v: number) => `${v.toFixed(2)} V`;
export const percent = (ratio: number, digits = ratio < 0.1 ? 2 : 1) => `${(ratio * 100).toFixed(digits)} %`;
export const dbc = (v: number) => (v <= -200 ? 'below −200 dBc' : `${v.toFixed(1)} dBc`);
export function ohms(r: number) {
  if (r >= 1e6) return `${+(r / 1e6).toPrecision(3)} MΩ`;
  if (r >= 1e3) return `${+(r / 1e3).toPrecision(3)} kΩ`;
  return `${+r.toPrecision(3)} Ω`;
}
export function farads(f: number) {
  if (f === 0) return 'none';
  if (f >= 1e-6) return `${+(f * 1e6).toPrecision(3)} µF`;
  if (f >= 1e-9) return `${+(f * 1e9).toPrecision(3)} nF`;
  return `${+(f * 1e12).toPrecision(3)} pF`;
}
export const amps = (a: number) => `${a.toExponential(3)} A`;
export const TOPOLOGY_LABEL = { shunt: 'Shunt (hard, to ground)', feedback: 'Feedback (soft, across the gain resistor)', none: 'No clipper' } as const;
