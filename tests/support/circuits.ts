import type { CircuitSpec } from '../../shared/engine';

// Circuits for tests of code that consumes the engine (values invented for the tests).
const drive = { minGain: 1, maxGain: 120, taper: 'log' as const, inputPeakV: 0.1, railPeakV: 7.5 };

export const SYMMETRIC_SILICON_SHUNT: CircuitSpec = {
  clipper: {
    topology: 'shunt', seriesOhms: 2200, shuntFarads: 0,
    positive: [{ preset: 'si-small-signal' }], negative: [{ preset: 'si-small-signal' }],
  },
  drive,
};

export const ASYMMETRIC_SILICON_LED_SHUNT: CircuitSpec = {
  clipper: {
    topology: 'shunt', seriesOhms: 2200, shuntFarads: 0,
    positive: [{ preset: 'si-small-signal' }], negative: [{ preset: 'led-red' }],
  },
  drive,
};

export const LED_FEEDBACK_WITH_CAP: CircuitSpec = {
  clipper: {
    topology: 'feedback', feedbackOhms: 470000, groundOhms: 4700, feedbackFarads: 100e-12,
    positive: [{ preset: 'led-red' }], negative: [{ preset: 'led-red' }],
  },
  drive,
};
