// A bench capture set beside the unit's prediction at the reference setting: one comparison, used by
// the analyse endpoint, the verdict of a saved test, the test screen and the unit page.
//
// THD_F = √(Σ_{k≥2} A_k²) / A_1 and THD_R = √(Σ_{k≥2} A_k²) / √(Σ_{k≥1} A_k²) (the spec sheet's
// definitions). Over the same harmonics THD_R = THD_F / √(1 + THD_F²), which is how a prediction
// stored with THD_F only gets its THD_R.

/** One harmonic read from a capture: peak amplitude relative to full scale (a full-scale sine reads 1.0) and dBc. */
export interface MeasuredHarmonic {
  order: number;
  amplitudeFs: number;
  dbc: number;
}

/** What `POST /api/captures/analyse` answers for a WAV capture. */
export interface CaptureReading {
  fundamentalHz: number;
  sampleRate: number;
  channels: number;
  bitsPerSample: number;
  durationS: number;
  harmonics: MeasuredHarmonic[];
  thdFPercent: number;
  thdRPercent: number;
}

/** A unit's predicted spectrum at the bench's reference setting. */
export interface PredictionAtReference {
  referenceDrive: number;
  harmonics: { order: number; dbc: number }[];
  thdFPercent: number;
  thdRPercent: number;
}

/** A unit's stored prediction (units.predicted); THD_R is missing from ones stored before it was kept. */
export interface StoredPrediction {
  thdPercent: number;
  thdRPercent?: number;
  referenceDrive: number;
  harmonics: { order: number; dbc: number }[];
}

export const predictionAtReference = (p: StoredPrediction): PredictionAtReference => ({
  referenceDrive: p.referenceDrive, harmonics: p.harmonics, thdFPercent: p.thdPercent, thdRPercent: p.thdRPercent ?? thdRFromThdF(p.thdPercent),
});

export interface Tolerances {
  /** ± percent of the predicted THD_F (relative). */
  thdPercent: number;
  /** ± dB on each harmonic's level. */
  harmonicDb: number;
}

/** Harmonics compared one by one: H2…H8, the orders the sheet's table prints. */
export const COMPARED_ORDERS = [2, 3, 4, 5, 6, 7, 8] as const;

/**
 * Levels below this are treated as this: the bench's noise floor and the jig's own distortion sit
 * around −70 to −90 dBc, and a symmetric clip's predicted even harmonics are far below anything a
 * bench can read, so "both quieter than −60 dBc" is agreement. (Shop practice, an invented figure for
 * this product, kept in one place.)
 */
export const HARMONIC_FLOOR_DBC = -60;

export const thdRFromThdF = (thdFPercent: number) => (100 * (thdFPercent / 100)) / Math.sqrt(1 + (thdFPercent / 100) ** 2);

/** THD_F and THD_R (percent) from harmonic amplitudes in any one unit, H1 first. */
export function thdFromAmplitudes(amplitudes: { order: number; amplitude: number }[]) {
  const a1 = amplitudes.find((h) => h.order === 1)?.amplitude ?? 0;
  const distortion = amplitudes.filter((h) => h.order >= 2).reduce((s, h) => s + h.amplitude ** 2, 0);
  return {
    thdFPercent: a1 > 0 ? (100 * Math.sqrt(distortion)) / a1 : 0,
    thdRPercent: distortion + a1 * a1 > 0 ? (100 * Math.sqrt(distortion)) / Math.sqrt(distortion + a1 * a1) : 0,
  };
}

export interface HarmonicCheck {
  order: number;
  predictedDbc: number;
  measuredDbc: number | null;
  /** The band the measurement must fall in; no lower edge (null) when the prediction is below the floor. */
  lowDbc: number | null;
  highDbc: number;
  within: boolean | null;
}

export interface CaptureComparison {
  harmonics: HarmonicCheck[];
  thd: { predictedPercent: number; measuredPercent: number; lowPercent: number; highPercent: number; within: boolean };
  tolerances: Tolerances;
  within: boolean;
  /** Each miss in words, naming both the measurement and the prediction. */
  problems: string[];
}

export const formatDbcLevel = (dbc: number) => (dbc < -120 ? 'below −120 dBc' : `${dbc.toFixed(1).replace('-', '−')} dBc`);

/**
 * Compares a measurement with the prediction, e.g. THD_F 10.49 % against a predicted 10.20 % at ±15 %
 * is within. `measured.harmonics` is absent when the THD was typed (no capture): only THD is judged.
 */
export function compareWithPrediction(
  prediction: PredictionAtReference,
  measured: { thdFPercent: number; harmonics?: { order: number; dbc: number }[] | null },
  tolerances: Tolerances,
): CaptureComparison {
  const problems: string[] = [];
  const floor = (db: number) => Math.max(db, HARMONIC_FLOOR_DBC);
  const harmonics = COMPARED_ORDERS.map((order): HarmonicCheck => {
    const predictedDbc = prediction.harmonics.find((h) => h.order === order)?.dbc ?? -200;
    const measuredDbc = measured.harmonics?.find((h) => h.order === order)?.dbc ?? null;
    const centre = floor(predictedDbc);
    const lowDbc = centre === HARMONIC_FLOOR_DBC ? null : centre - tolerances.harmonicDb;
    const highDbc = centre + tolerances.harmonicDb;
    const within = measuredDbc === null ? null : Math.abs(floor(measuredDbc) - centre) <= tolerances.harmonicDb;
    if (within === false && measuredDbc !== null) {
      problems.push(`H${order} measured ${formatDbcLevel(measuredDbc)} against the predicted ${formatDbcLevel(predictedDbc)} (±${tolerances.harmonicDb} dB)`);
    }
    return { order, predictedDbc, measuredDbc, lowDbc, highDbc, within };
  });
  const p = prediction.thdFPercent;
  const spread = (tolerances.thdPercent / 100) * p;
  const thdWithin = Math.abs(measured.thdFPercent - p) <= spread;
  if (!thdWithin) {
    problems.unshift(`THD measured ${measured.thdFPercent.toFixed(2)} % against the predicted ${p.toFixed(2)} % (±${tolerances.thdPercent} % of it: ${(p - spread).toFixed(2)}–${(p + spread).toFixed(2)} %)`);
  }
  return {
    harmonics,
    thd: { predictedPercent: p, measuredPercent: measured.thdFPercent, lowPercent: p - spread, highPercent: p + spread, within: thdWithin },
    tolerances,
    within: thdWithin && harmonics.every((h) => h.within !== false),
    problems,
  };
}
