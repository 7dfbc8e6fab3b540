import type { ContractOutput, HarmonicProfile, ProfileOptions, Spectrum, TransferCurve } from '../../../shared/engine/index';

export type ProfileRequest =
  | { id: number; kind: 'profile'; circuit: unknown; contract?: unknown }
  | { id: number; kind: 'at'; circuit: unknown; drive: number }
  /** Just the profile with the caller's options (no bands unless asked), e.g. the storefront's option cards. */
  | { id: number; kind: 'summary'; circuit: unknown; options: ProfileOptions };

export interface DriveSpectrum { drive: number; gain: number; spectrum: Spectrum }

export type ProfileResponse =
  | { id: number; kind: 'profile'; profile: HarmonicProfile; threeDrives: DriveSpectrum[]; contract: ContractOutput | null }
  | { id: number; kind: 'at'; drive: number; gain: number; spectrum: Spectrum; transfer: TransferCurve | null }
  | { id: number; kind: 'summary'; profile: HarmonicProfile }
  | { id: number; kind: 'error'; message: string };
