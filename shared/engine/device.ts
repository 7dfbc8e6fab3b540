// Junction devices: the SPICE diode's DC law (Shockley equation with series resistance),
// its temperature scaling, forward voltage at a current, and fits from datasheet points.
import {
  DEFAULT_ENERGY_GAP, DEFAULT_XTI, NOMINAL_TEMPERATURE_C, celsiusToKelvin, thermalVoltage,
} from './constants';
import { EngineInputError, checkPositive, checkRange } from './errors';
import type { Amperes, Celsius, ElectronVolts, Ohms, Volts } from './units';

/** SPICE diode parameters at TNOM = 27 °C, e.g. {is: 2.52e-9, n: 1.752, rs: 0.568}. */
export interface DeviceModel {
  /** Saturation current IS. */
  is: Amperes;
  /** Emission coefficient N. */
  n: number;
  /** Ohmic series resistance RS (0 when absent). */
  rs: Ohms;
  /** Energy gap EG (default 1.11 eV). */
  eg?: ElectronVolts;
  /** Saturation-current temperature exponent XTI (default 3). */
  xti?: number;
}

/** Ranges a device parameter must lie in; the solver is guaranteed over all of them. */
export const DEVICE_LIMITS = {
  is: { min: 1e-30, max: 1 },
  n: { min: 0.5, max: 10 },
  rs: { min: 0, max: 1e6 },
  eg: { min: 0.1, max: 5 },
  xti: { min: -50, max: 50 },
} as const;

/** Throws an EngineInputError naming the field if any parameter is out of range; returns the device. */
export function checkDevice(d: DeviceModel, path = 'device'): DeviceModel {
  checkPositive(d.is, `${path}.is`, DEVICE_LIMITS.is.max);
  if (d.is < DEVICE_LIMITS.is.min) {
    throw new EngineInputError(`${path}.is`, `${path}.is must be ≥ ${DEVICE_LIMITS.is.min}, got ${d.is}`);
  }
  checkRange(d.n, DEVICE_LIMITS.n.min, DEVICE_LIMITS.n.max, `${path}.n`);
  checkRange(d.rs, DEVICE_LIMITS.rs.min, DEVICE_LIMITS.rs.max, `${path}.rs`);
  if (d.eg !== undefined) checkRange(d.eg, DEVICE_LIMITS.eg.min, DEVICE_LIMITS.eg.max, `${path}.eg`);
  if (d.xti !== undefined) checkRange(d.xti, DEVICE_LIMITS.xti.min, DEVICE_LIMITS.xti.max, `${path}.xti`);
  return d;
}

/**
 * IS at a temperature as the SPICE diode model scales it, e.g. saturationCurrentAt(1N4148-like, 27) = 2.52e-9:
 * IS(T) = IS·(T/Tnom)^(XTI/N)·exp((T/Tnom − 1)·EG/(N·Vt(T)))  (SPICE2/3 diode temperature model).
 */
export function saturationCurrentAt(d: DeviceModel, temperatureC: Celsius = NOMINAL_TEMPERATURE_C): Amperes {
  const t = celsiusToKelvin(temperatureC);
  const tnom = celsiusToKelvin(NOMINAL_TEMPERATURE_C);
  const ratio = t / tnom;
  const eg = d.eg ?? DEFAULT_ENERGY_GAP;
  const xti = d.xti ?? DEFAULT_XTI;
  const vt = thermalVoltage(t);
  return d.is * Math.exp((ratio - 1) * eg / (d.n * vt) + (xti / d.n) * Math.log(ratio));
}

/** Forward voltage at a current, V = N·Vt·ln(1 + I/IS) + I·RS, e.g. 1N4148-like at 1 mA ≈ 0.585 V. */
export function forwardVoltage(d: DeviceModel, current: Amperes, temperatureC: Celsius = NOMINAL_TEMPERATURE_C): Volts {
  checkPositive(current, 'current');
  const is = saturationCurrentAt(d, temperatureC);
  const vt = thermalVoltage(celsiusToKelvin(temperatureC));
  return d.n * vt * Math.log1p(current / is) + current * d.rs;
}

/** Voltage across a series string carrying one current, e.g. two LEDs at 10 mA ≈ 3.6 V. */
export function stringVoltage(devices: readonly DeviceModel[], current: Amperes, temperatureC: Celsius = NOMINAL_TEMPERATURE_C): Volts {
  let v = 0;
  for (const d of devices) v += forwardVoltage(d, current, temperatureC);
  return v;
}

/** Forward voltage at 1 mA and 10 mA, the two figures the device library shows, e.g. {atOneMilliamp: 0.585, atTenMilliamps: 0.694}. */
export function forwardVoltageCard(d: DeviceModel, temperatureC: Celsius = NOMINAL_TEMPERATURE_C): { atOneMilliamp: Volts; atTenMilliamps: Volts } {
  return { atOneMilliamp: forwardVoltage(d, 1e-3, temperatureC), atTenMilliamps: forwardVoltage(d, 10e-3, temperatureC) };
}

/** One datasheet point: forward voltage at a forward current, e.g. {vf: 0.62, current: 5e-3}. */
export interface ForwardPoint {
  vf: Volts;
  current: Amperes;
}

function checkPoint(p: ForwardPoint, path: string): void {
  checkPositive(p.vf, `${path}.vf`, 100);
  checkPositive(p.current, `${path}.current`, 100);
}

function fitTwo(a: ForwardPoint, b: ForwardPoint, rs: Ohms, vt: Volts, path: string): { is: Amperes; n: number } {
  const va = a.vf - a.current * rs;
  const vb = b.vf - b.current * rs;
  let n = (vb - va) / (vt * Math.log(b.current / a.current));
  if (!(n > 0) || !Number.isFinite(n)) {
    throw new EngineInputError(path, `${path}: forward voltage must rise with current, got ${a.vf} V at ${a.current} A and ${b.vf} V at ${b.current} A`);
  }
  let is = a.current / Math.expm1(va / (n * vt));
  // ln(1 + I/IS) differs from ln(I/IS) by about IS/I; a few passes make the fit exact.
  for (let i = 0; i < 50; i++) {
    const next = (vb - va) / (vt * (Math.log1p(b.current / is) - Math.log1p(a.current / is)));
    is = a.current / Math.expm1(va / (next * vt));
    if (Math.abs(next - n) <= 1e-15 * n) { n = next; break; }
    n = next;
  }
  return { n, is };
}

/**
 * Fit IS and N from two (Vf, If) points, and RS from an optional third (highest-current) point, at 27 °C unless stated,
 * e.g. fitDevice([{vf: 0.585, current: 1e-3}, {vf: 0.694, current: 1e-2}]) ≈ {is: 2.5e-9, n: 1.75, rs: 0}.
 * Solves V_i = N·Vt·ln(1 + I_i/IS) + I_i·RS by fixed-point iteration on RS.
 */
export function fitDevice(points: readonly ForwardPoint[], temperatureC: Celsius = NOMINAL_TEMPERATURE_C, path = 'points'): DeviceModel {
  if (points.length !== 2 && points.length !== 3) {
    throw new EngineInputError(path, `${path} must hold 2 or 3 points, got ${points.length}`);
  }
  const sorted = [...points].sort((p, q) => p.current - q.current);
  sorted.forEach((p, i) => checkPoint(p, `${path}[${i}]`));
  if (sorted[0].current === sorted[1].current) {
    throw new EngineInputError(path, `${path}: the points need different currents, got ${sorted[0].current} A twice`);
  }
  const vt = thermalVoltage(celsiusToKelvin(temperatureC));
  let rs = 0;
  let fit = fitTwo(sorted[0], sorted[1], rs, vt, path);
  if (sorted.length === 3) {
    // The third point's mismatch as a function of RS (IS, N refitted through the first two): secant on it.
    const top = sorted[2];
    const mismatch = (r: number): number => {
      const f = fitTwo(sorted[0], sorted[1], r, vt, path);
      return f.n * vt * Math.log1p(top.current / f.is) + top.current * r - top.vf;
    };
    let r0 = 0;
    let m0 = mismatch(r0);
    let r1 = Math.max(0, -m0 / top.current);
    let m1 = mismatch(r1);
    for (let i = 0; i < 100 && Math.abs(m1) > 1e-15 && r1 !== r0; i++) {
      const r2 = Math.max(0, r1 - (m1 * (r1 - r0)) / (m1 - m0));
      r0 = r1; m0 = m1; r1 = r2; m1 = mismatch(r1);
    }
    rs = r1;
    fit = fitTwo(sorted[0], sorted[1], rs, vt, path);
  }
  const model: DeviceModel = { is: fit.is, n: fit.n, rs };
  // Parameters were fitted at the stated temperature; refer IS back to TNOM.
  if (temperatureC !== NOMINAL_TEMPERATURE_C) {
    model.is = model.is / saturationCurrentAt({ ...model, is: 1 }, temperatureC);
  }
  return checkDevice(model, path);
}

/**
 * Refit IS from one measured forward voltage at a test current, keeping N and RS, e.g.
 * refitSaturationCurrent(1N4148-like, 0.60, 1e-3) ≈ 1.8e-9 A (a unit with a slightly higher Vf).
 * The measurement temperature defaults to 27 °C; the returned IS is referred to TNOM.
 */
export function refitSaturationCurrent(d: DeviceModel, measuredVf: Volts, testCurrent: Amperes, temperatureC: Celsius = NOMINAL_TEMPERATURE_C, path = 'vf'): DeviceModel {
  checkPositive(measuredVf, path, 100);
  checkPositive(testCurrent, 'testCurrent', 100);
  const vt = thermalVoltage(celsiusToKelvin(temperatureC));
  const vj = measuredVf - testCurrent * d.rs;
  if (!(vj > 0)) {
    throw new EngineInputError(path, `${path}: measured ${measuredVf} V must exceed the RS drop ${testCurrent * d.rs} V at ${testCurrent} A`);
  }
  const isAtT = testCurrent / Math.expm1(vj / (d.n * vt));
  // Refer back to TNOM: IS(T) scales linearly with IS(TNOM).
  const scale = saturationCurrentAt({ ...d, is: 1 }, temperatureC);
  return checkDevice({ ...d, is: isAtT / scale }, path);
}
