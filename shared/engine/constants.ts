import type { Celsius, ElectronVolts, Kelvin, Volts } from './units';

/** Boltzmann constant k in J/K, exact since the 2019 SI redefinition (CODATA 2018): 1.380649e-23. */
export const BOLTZMANN = 1.380649e-23;
/** Elementary charge q in C, exact since the 2019 SI redefinition (CODATA 2018): 1.602176634e-19. */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
/** Offset between Celsius and kelvin, exact by definition of the SI: 273.15. */
export const ZERO_CELSIUS_IN_KELVIN = 273.15;
/** Nominal temperature of device parameters (SPICE TNOM default): 27 °C. */
export const NOMINAL_TEMPERATURE_C: Celsius = 27;
/** Default energy gap EG of the SPICE diode model (silicon): 1.11 eV. */
export const DEFAULT_ENERGY_GAP: ElectronVolts = 1.11;
/** Default saturation-current temperature exponent XTI of the SPICE diode model: 3. */
export const DEFAULT_XTI = 3;

/**
 * The engine's one documented epsilon: relative tolerance of every nonlinear solve, e.g. 1e-13.
 * Far below anything a spectrum can show (−120 dBc is 1e-6), far above double rounding (2.2e-16).
 */
export const SOLVE_RELATIVE_TOLERANCE = 1e-13;

/** Celsius to kelvin, e.g. celsiusToKelvin(27) = 300.15. */
export function celsiusToKelvin(t: Celsius): Kelvin {
  return t + ZERO_CELSIUS_IN_KELVIN;
}

/** Thermal voltage Vt = kT/q, e.g. thermalVoltage(300.15) ≈ 0.025865 V (exact SI constants). */
export function thermalVoltage(t: Kelvin): Volts {
  return (BOLTZMANN * t) / ELEMENTARY_CHARGE;
}
