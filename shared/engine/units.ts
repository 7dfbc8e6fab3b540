// Unit-named number types: signatures read in units. They are plain numbers at run time.

/** Electric potential in volts, e.g. 0.585 (a silicon diode at 1 mA). */
export type Volts = number;
/** Current in amperes, e.g. 1e-3. */
export type Amperes = number;
/** Resistance in ohms, e.g. 2200. */
export type Ohms = number;
/** Capacitance in farads, e.g. 10e-9. */
export type Farads = number;
/** Frequency in hertz, e.g. 1000. */
export type Hertz = number;
/** Time in seconds, e.g. 1e-3. */
export type Seconds = number;
/** Absolute temperature in kelvin, e.g. 300.15. */
export type Kelvin = number;
/** Temperature in degrees Celsius, e.g. 27. */
export type Celsius = number;
/** Level relative to a reference in decibels, e.g. −12.7 dBc. */
export type Decibels = number;
/** Dimensionless ratio, e.g. 0.26 for a THD of 26 %. */
export type Ratio = number;
/** Energy gap in electron-volts, e.g. 1.11 (silicon). */
export type ElectronVolts = number;
