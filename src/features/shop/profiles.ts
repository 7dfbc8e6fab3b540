import { computeProfile, type HarmonicProfile } from '../../../shared/engine';
import type { ShopOption } from './api';

export interface OptionProfile {
  option: ShopOption;
  profile: HarmonicProfile | null;
  error: string | null;
}

/** The engine's profile of each option, computed in the browser from the catalog's engine input. */
export function profilesOf(options: ShopOption[]): OptionProfile[] {
  return options.map((option) => {
    if (!option.engineInput) return { option, profile: null, error: 'No circuit data for this option yet' };
    try {
      return { option, profile: computeProfile(option.engineInput.circuit, { sweepPoints: 13, harmonics: 7 }), error: null };
    } catch (e) {
      return { option, profile: null, error: e instanceof Error ? e.message : 'The profile could not be computed' };
    }
  });
}

/** Below this a harmonic is numerical noise, not sound: a symmetric clip has no even orders at all. */
export const INAUDIBLE_DBC = -100;

/** dBc of harmonic n at the reference setting, e.g. dbcOf(p, 2) = −13.3; null when below −100 dBc. */
export function dbcOf(profile: HarmonicProfile, order: number): number | null {
  const h = profile.reference.spectrum.harmonics.find((x) => x.order === order);
  return h && Number.isFinite(h.dbc) && h.dbc > INAUDIBLE_DBC ? h.dbc : null;
}

/**
 * A plain-words reading of a profile, from its numbers only: which family of harmonics leads,
 * and how early the option starts to clip.
 */
export function describeProfile(profile: HarmonicProfile): string {
  const s = profile.reference.spectrum;
  const even = s.evenEnergyShare;
  const h2 = dbcOf(profile, 2) ?? -120;
  const h3 = dbcOf(profile, 3) ?? -120;
  const family = even > 0.6 ? 'Mostly even harmonics' : even > 0.25 ? 'A mix of even and odd harmonics' : 'Mostly odd harmonics';
  const lead = h2 > h3 ? 'the second harmonic leads' : 'the third harmonic leads';
  const onset = profile.clippingOnsetDrive;
  const when = onset === null ? 'stays clean across the drive range' : onset <= 0.05 ? 'clips from the bottom of the drive range' : `starts to clip at about ${Math.round(onset * 100)} % drive`;
  return `${family} (${lead}); it ${when}.`;
}
