// Plausible forward voltage near 1 mA for each device kind: common practice (see the product
// brief's "facts of the trade"), widened a little so ordinary part spread is not flagged.
// Values outside these ranges are flagged before the assembler saves them.
import type { Volts } from '../engine/units';

export const VF_RANGES: Record<string, { min: Volts; max: Volts }> = {
  silicon: { min: 0.5, max: 0.8 },
  rectifier: { min: 0.5, max: 0.85 },
  schottky: { min: 0.15, max: 0.5 },
  germanium: { min: 0.15, max: 0.4 },
  led: { min: 1.5, max: 3.5 },
  other: { min: 0.1, max: 4 },
};

/** The range for a device kind, falling back to the widest, e.g. vfRange('led').min = 1.5. */
export function vfRange(kind: string) {
  return VF_RANGES[kind] ?? VF_RANGES.other;
}

/** True when a measured Vf is outside the kind's range, e.g. isVfOutOfRange('silicon', 1.2) = true. */
export function isVfOutOfRange(kind: string, vf: Volts): boolean {
  const r = vfRange(kind);
  return !(vf >= r.min && vf <= r.max);
}
