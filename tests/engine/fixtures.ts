// Shared circuits for the engine tests (plain contract JSON).
export const SILICON = { is: 2.52e-9, n: 1.752, rs: 0.568 };
export const RED_LED = { preset: 'led-red' };

export function shunt(overrides: Record<string, unknown> = {}, clipper: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    toneHz: 1000, inputPeakV: 0.1, driveGain: 20, railPeakV: 4, temperatureC: 27, harmonics: 10,
    clipper: { topology: 'shunt', seriesOhms: 2200, shuntFarads: 0, positive: [SILICON], negative: [SILICON], ...clipper },
    ...overrides,
  };
}

export function feedback(overrides: Record<string, unknown> = {}, clipper: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    toneHz: 1000, inputPeakV: 0.1, driveGain: 3, temperatureC: 27, harmonics: 10,
    clipper: { topology: 'feedback', feedbackOhms: 100000, groundOhms: 4700, feedbackFarads: 0, positive: [SILICON], negative: [SILICON], ...clipper },
    ...overrides,
  };
}

export const toDb = (x: number): number => 20 * Math.log10(x);
