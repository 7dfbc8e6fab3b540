import { requireNgspice, ngspiceForwardVoltage } from '../support/ngspice';
import { describe, it, expect } from 'vitest';
import {
  BOLTZMANN, DEVICE_PRESETS, ELEMENTARY_CHARGE, fitDevice, forwardVoltage, forwardVoltageCard,
  refitSaturationCurrent, saturationCurrentAt, thermalVoltage, celsiusToKelvin, type DevicePreset,
} from '../../shared/engine/index';

describe('constants', () => {
  it('uses the exact SI values of k and q and gives Vt at 27 °C', () => {
    // CODATA 2018 / SI 2019: k = 1.380649e-23 J/K and q = 1.602176634e-19 C are exact.
    expect(BOLTZMANN).toBe(1.380649e-23);
    expect(ELEMENTARY_CHARGE).toBe(1.602176634e-19);
    // Vt = kT/q at 300.15 K = 25.86493 mV (computed from the exact constants).
    expect(thermalVoltage(celsiusToKelvin(27))).toBeCloseTo(0.0258649258, 9);
  });
});

describe('device presets: Vf in the ranges of product.md (common practice)', () => {
  const range: Record<string, [number, number, 'one' | 'ten']> = {
    silicon: [0.55, 0.7, 'one'], rectifier: [0.55, 0.7, 'one'], schottky: [0.2, 0.45, 'one'], germanium: [0.2, 0.35, 'one'],
  };
  const led: Record<string, [number, number]> = {
    'led-red': [1.6, 2.0], 'led-blue': [2.7, 3.4], 'led-white': [2.7, 3.4],
  };
  for (const p of DEVICE_PRESETS) {
    it(`${p.id} has provenance and an in-range Vf`, () => {
      expect(p.provenance.length).toBeGreaterThan(20);
      const card = forwardVoltageCard(p.model);
      expect(card.atTenMilliamps).toBeGreaterThan(card.atOneMilliamp);
      if (p.family !== 'led') {
        const [lo, hi] = range[p.family];
        expect(card.atOneMilliamp).toBeGreaterThanOrEqual(lo);
        expect(card.atOneMilliamp).toBeLessThanOrEqual(hi);
      } else if (led[p.id]) {
        // product.md gives LED ranges at 10–20 mA.
        const [lo, hi] = led[p.id];
        for (const i of [10e-3, 20e-3]) {
          expect(forwardVoltage(p.model, i)).toBeGreaterThanOrEqual(lo);
          expect(forwardVoltage(p.model, i)).toBeLessThanOrEqual(hi);
        }
      } else {
        // Yellow and green sit between red and blue at 10 mA.
        expect(card.atTenMilliamps).toBeGreaterThan(1.6);
        expect(card.atTenMilliamps).toBeLessThan(3.4);
      }
    });
  }
  it('tells staff in the shop’s words that every preset holds typical values, not measured ones', () => {
    const leds = DEVICE_PRESETS.filter((p: DevicePreset) => p.family === 'led');
    expect(leds.length).toBe(5);
    for (const p of DEVICE_PRESETS) {
      expect(p.provenance).toMatch(/^Typical values of .+, not measured here\.$/);
      expect(p.provenance).not.toMatch(/from memory|recalled|IS=|SPICE/);
    }
    for (const p of leds) expect(p.fittedFrom).toHaveLength(3);
  });
});

describe('device law', () => {
  const si = { is: 2.52e-9, n: 1.752, rs: 0.568 };
  it('fits IS and N from two points and RS from a third (round trip)', () => {
    const pts = [1e-4, 1e-3, 30e-3].map((i) => ({ vf: forwardVoltage(si, i), current: i }));
    const fit = fitDevice(pts);
    expect(fit.is / si.is).toBeCloseTo(1, 6);
    expect(fit.n).toBeCloseTo(si.n, 8);
    expect(fit.rs).toBeCloseTo(si.rs, 6);
  });
  it('scales IS with temperature as the SPICE diode model (EG, XTI)', () => {
    expect(saturationCurrentAt(si, 27)).toBe(si.is);
    // Outside check: ngspice's DC operating point of the same diode (its own EG/XTI temperature scaling)
    // at 1 mA gives the same forward voltage at −20, 77 and 125 °C, to 0.1 mV.
    requireNgspice();
    for (const celsius of [-20, 77, 125]) {
      expect(Math.abs(forwardVoltage(si, 1e-3, celsius) - ngspiceForwardVoltage(si, 1e-3, celsius)), `${celsius} °C`).toBeLessThan(1e-4);
    }
    // Silicon Vf falls by roughly 2 mV/K (common practice).
    const slope = (forwardVoltage(si, 1e-3, 77) - forwardVoltage(si, 1e-3, 27)) / 50;
    expect(slope).toBeLessThan(-1.2e-3);
    expect(slope).toBeGreaterThan(-2.8e-3);
  });
  it('refits IS from a measured Vf keeping N and RS', () => {
    const unit = refitSaturationCurrent(si, 0.6, 1e-3);
    expect(unit.n).toBe(si.n);
    expect(unit.rs).toBe(si.rs);
    expect(forwardVoltage(unit, 1e-3)).toBeCloseTo(0.6, 12);
    const warm = refitSaturationCurrent(si, 0.56, 1e-3, 45);
    expect(forwardVoltage(warm, 1e-3, 45)).toBeCloseTo(0.56, 12);
  });
});
