// The device library: each preset states where its numbers come from. `provenance` is what staff
// read beside the device, in the shop's words; how each set of numbers was obtained is in the
// comment beside it.
import { fitDevice, type DeviceModel, type ForwardPoint } from './device';

/** Broad family of a junction device, e.g. 'silicon'. */
export type DeviceFamily = 'silicon' | 'rectifier' | 'schottky' | 'germanium' | 'led';

/** One library entry: parameters plus their provenance, e.g. the small-signal silicon preset. */
export interface DevicePreset {
  id: string;
  label: string;
  family: DeviceFamily;
  model: DeviceModel;
  provenance: string;
  /** Datasheet points the model was fitted from, when it was fitted. */
  fittedFrom?: readonly ForwardPoint[];
}

function fitted(id: string, label: string, family: DeviceFamily, points: ForwardPoint[], what: string): DevicePreset {
  return {
    id, label, family,
    model: fitDevice(points),
    // IS and N are fitted from the first two points, RS from the third.
    provenance: `Typical values of the published model for ${what} (forward voltage at 1, 10 and 30 mA), not measured here.`,
    fittedFrom: points,
  };
}

const pts = (a: number, b: number, c: number): ForwardPoint[] => [
  { vf: a, current: 1e-3 }, { vf: b, current: 10e-3 }, { vf: c, current: 30e-3 },
];

/** The preset library, e.g. DEVICE_PRESETS[0].id = 'si-small-signal'. */
export const DEVICE_PRESETS: readonly DevicePreset[] = [
  {
    id: 'si-small-signal', label: 'Silicon small-signal (1N4148 type)', family: 'silicon',
    model: { is: 2.52e-9, n: 1.752, rs: 0.568 },
    // The published SPICE model of the small-signal switching diode, values recalled from memory; DC parameters only.
    provenance: 'Typical values of the published model of the 1N4148 small-signal diode, not measured here.',
  },
  {
    id: 'si-rectifier', label: 'Silicon rectifier (1N4001 type)', family: 'rectifier',
    model: { is: 14.11e-9, n: 1.984, rs: 0.03389, eg: 1.11, xti: 3 },
    // The published SPICE model of the rectifier, values recalled from memory; its high-injection knee IKF is not modelled.
    provenance: 'Typical values of the published model of the 1N4001 rectifier, not measured here.',
  },
  {
    id: 'schottky-small-signal', label: 'Schottky small-signal', family: 'schottky',
    model: { is: 1.2e-7, n: 1.3, rs: 2.0, eg: 0.69, xti: 2 },
    // Typical small-signal Schottky values from memory (Vf ≈ 0.30 V at 1 mA); EG=0.69 eV and XTI=2 as usual for Schottky barriers.
    provenance: 'Typical values of a small-signal Schottky diode (about 0.30 V at 1 mA), not measured here.',
  },
  {
    id: 'germanium-point-contact', label: 'Germanium point-contact', family: 'germanium',
    model: { is: 2.0e-7, n: 1.3, rs: 5.0, eg: 0.67, xti: 3 },
    // Typical germanium point-contact values from memory (Vf ≈ 0.29 V at 1 mA); EG=0.67 eV for germanium.
    provenance: 'Typical values of a germanium point-contact diode (about 0.29 V at 1 mA), not measured here.',
  },
  fitted('led-red', 'LED, red', 'led', pts(1.65, 1.80, 1.92), 'a 5 mm red LED'),
  fitted('led-yellow', 'LED, yellow', 'led', pts(1.75, 1.92, 2.04), 'a 5 mm yellow LED'),
  fitted('led-green', 'LED, green (GaP type)', 'led', pts(1.85, 2.02, 2.14), 'a 5 mm green GaP LED'),
  fitted('led-blue', 'LED, blue', 'led', pts(2.65, 2.95, 3.12), 'a 5 mm blue InGaN LED'),
  fitted('led-white', 'LED, white', 'led', pts(2.70, 3.00, 3.20), 'a 5 mm white InGaN LED'),
];

/** Look a preset up by id, or undefined, e.g. findPreset('led-red')?.family = 'led'. */
export function findPreset(id: string): DevicePreset | undefined {
  return DEVICE_PRESETS.find((p) => p.id === id);
}
