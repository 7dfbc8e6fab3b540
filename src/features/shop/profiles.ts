import { useMemo } from 'react';
import type { HarmonicProfile, ProfileOptions } from '../../../shared/engine';
import { useProfileSummaries } from '../catalog/useProfile';
import type { ShopOption } from './api';

export interface OptionProfile {
  option: ShopOption;
  profile: HarmonicProfile | null;
  /** Why there is no profile; null while it is still being computed. */
  error: string | null;
}

/** What the storefront shows of each option: a 13-point sweep and H1…H7, no tolerance bands. */
const STOREFRONT_PROFILE: ProfileOptions = { sweepPoints: 13, harmonics: 7 };

/**
 * The engine's profile of each option, computed in the catalog's Web Worker from the engine input (a full
 * profile is tens of ms per option, too long for the main thread). Options without one say so at once.
 */
export function useOptionProfiles(options: ShopOption[]): OptionProfile[] {
  const circuits = useMemo(
    () => options.flatMap((o) => (o.engineInput ? [{ key: JSON.stringify(o.engineInput.circuit), circuit: o.engineInput.circuit }] : [])),
    [options],
  );
  const results = useProfileSummaries(circuits, STOREFRONT_PROFILE);
  return useMemo(() => options.map((option) => {
    if (!option.engineInput) return { option, profile: null, error: 'No circuit data for this option yet' };
    const r = results[JSON.stringify(option.engineInput.circuit)];
    return { option, profile: r?.profile ?? null, error: r?.error ?? null };
  }), [options, results]);
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
