// Clipping networks and the drive stage ahead of them, as plain data.
import { NOMINAL_TEMPERATURE_C } from './constants';
import type { DeviceModel } from './device';
import { checkRange } from './errors';
import type { Celsius, Farads, Hertz, Ohms, Ratio, Volts } from './units';

/** How the clipping devices sit in the circuit, e.g. 'shunt' (hard) or 'feedback' (soft); 'none' bypasses. */
export type Topology = 'shunt' | 'feedback' | 'none';

/**
 * A clipping network with every device resolved to SPICE parameters, e.g. a 2.2 kΩ shunt pair.
 * shunt: drive output → seriesOhms → node; node to ground through the strings and shuntFarads; output = node.
 * feedback: ideal non-inverting op-amp; groundOhms from inverting input to ground, feedbackOhms from output to
 * inverting input with the strings and feedbackFarads across it; output = op-amp output.
 * `positive` conducts when the node (or the output end of the feedback resistor) is above the other end.
 */
export interface ClippingNetwork {
  topology: Topology;
  seriesOhms: Ohms;
  shuntFarads: Farads;
  feedbackOhms: Ohms;
  groundOhms: Ohms;
  feedbackFarads: Farads;
  positive: DeviceModel[];
  negative: DeviceModel[];
}

/** Everything one steady-state solve needs, e.g. a 1 kHz, 0.1 V tone at gain 20 into a shunt pair. */
export interface StageSetup {
  toneHz: Hertz;
  inputPeakV: Volts;
  /** Ideal linear gain ahead of the clipper. */
  driveGain: Ratio;
  /** Ideal clip of the drive stage's output at ± this voltage; null for no limit. */
  railPeakV: Volts | null;
  network: ClippingNetwork;
  temperatureC: Celsius;
}

/** Resistance law of the drive potentiometer: 'linear' (B) or 'log' (audio, A). */
export type PotTaper = 'linear' | 'log';

/** The drive stage of a model revision, e.g. {minGain: 1, maxGain: 200, taper: 'log', inputPeakV: 0.1, railPeakV: 3}. */
export interface DriveStage {
  minGain: Ratio;
  maxGain: Ratio;
  taper: PotTaper;
  inputPeakV: Volts;
  railPeakV: Volts | null;
}

/** Audio taper: 10 % of the track at mid-rotation, a common log-pot law; b is chosen so that f(0.5) = 0.1. */
const AUDIO_TAPER_BASE = 81;

/** Fraction of the pot's resistance in circuit at a rotation 0..1, e.g. taperFraction(0.5, 'log') = 0.1. */
export function taperFraction(rotation: Ratio, taper: PotTaper): Ratio {
  checkRange(rotation, 0, 1, 'drive');
  if (taper === 'linear') return rotation;
  return (Math.pow(AUDIO_TAPER_BASE, rotation) - 1) / (AUDIO_TAPER_BASE - 1);
}

/**
 * Gain at a drive rotation, e.g. gainAtDrive({minGain: 1, maxGain: 101, taper: 'linear', …}, 0.5) = 51.
 * The gain is linear in the pot resistance in circuit, as in a non-inverting stage with the pot in its feedback leg.
 */
export function gainAtDrive(stage: DriveStage, rotation: Ratio): Ratio {
  return stage.minGain + (stage.maxGain - stage.minGain) * taperFraction(rotation, stage.taper);
}

/** Typical op-amp output headroom to each supply rail: 1.5 V. */
export const DEFAULT_HEADROOM_V: Volts = 1.5;

/**
 * Peak output swing of a stage biased at half supply, e.g. railPeakFromSupply(9) = 3.0 V, railPeakFromSupply(18) = 7.5 V.
 */
export function railPeakFromSupply(supplyV: Volts, headroomV: Volts = DEFAULT_HEADROOM_V): Volts {
  checkRange(supplyV, 1, 60, 'supplyV');
  checkRange(headroomV, 0, supplyV / 2 - 0.01, 'headroomV');
  return supplyV / 2 - headroomV;
}

/** A network with no clipping devices (output = drive stage), e.g. for clean references. */
export function bypassNetwork(): ClippingNetwork {
  return { topology: 'none', seriesOhms: 1, shuntFarads: 0, feedbackOhms: 1, groundOhms: 1, feedbackFarads: 0, positive: [], negative: [] };
}

/** True when the network stores charge, so the response depends on history, e.g. a 10 nF shunt cap. */
export function hasCapacitor(network: ClippingNetwork): boolean {
  if (network.topology === 'shunt') return network.shuntFarads > 0;
  if (network.topology === 'feedback') return network.feedbackFarads > 0;
  return false;
}

/** Default temperature of a setup: TNOM, 27 °C. */
export const DEFAULT_TEMPERATURE_C: Celsius = NOMINAL_TEMPERATURE_C;
