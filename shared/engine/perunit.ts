// Per-unit devices: from each installed device's measured forward voltage, refit IS (N and RS kept)
// so the profile is that unit's own.
import { resolveCircuit, type Circuit, type CircuitSpec } from './circuit';
import { NOMINAL_TEMPERATURE_C } from './constants';
import { refitSaturationCurrent, type DeviceModel } from './device';
import { EngineInputError } from './errors';
import type { ClippingNetwork } from './network';
import type { Amperes, Celsius, Volts } from './units';

/** Measured forward voltages, one per installed device, in string order, e.g. {positive: [0.598], negative: [0.603]}. */
export interface MeasuredForwardVoltages {
  positive: Volts[];
  negative: Volts[];
  /** Bench test current the voltages were read at, e.g. 1e-3. */
  testCurrentA: Amperes;
  /** Bench temperature; default 27 °C. */
  temperatureC?: Celsius;
}

function refitString(devices: readonly DeviceModel[], vf: readonly Volts[], m: MeasuredForwardVoltages, side: string): DeviceModel[] {
  if (vf.length !== devices.length) {
    throw new EngineInputError(`measured.${side}`, `measured.${side} must hold ${devices.length} voltages (one per device), got ${vf.length}`);
  }
  return devices.map((d, i) =>
    refitSaturationCurrent(d, vf[i], m.testCurrentA, m.temperatureC ?? NOMINAL_TEMPERATURE_C, `measured.${side}[${i}]`));
}

/** The network with each device's IS refitted from its measured Vf, e.g. perUnitDevices(net, {positive: [0.6], negative: [0.6], testCurrentA: 1e-3}). */
export function perUnitDevices(network: ClippingNetwork, measured: MeasuredForwardVoltages): ClippingNetwork {
  return {
    ...network,
    positive: refitString(network.positive, measured.positive, measured, 'positive'),
    negative: refitString(network.negative, measured.negative, measured, 'negative'),
  };
}

/** A circuit whose devices are this unit's, ready for computeProfile, e.g. perUnitCircuit(spec, measured). */
export function perUnitCircuit(spec: CircuitSpec | Circuit, measured: MeasuredForwardVoltages): Circuit {
  const c = resolveCircuit(spec);
  return { ...c, network: perUnitDevices(c.network, measured) };
}
