import type { SheetProfile } from '../services/spec-sheets/sheet-profile';

/** Everything one unit's spec sheet prints; built from stored data so the same unit gives the same sheet. */
export interface SpecSheetData {
  paper: 'A4' | 'Letter';
  shop: { name: string; address: string; email: string };
  unit: {
    serial: string;
    model: string;
    revision: string;
    batch: string;
    builtOn: string | null;
    testedOn: string | null;
    assembler: string;
    tester: string;
  };
  option: { name: string; topology: 'shunt' | 'feedback' | 'none'; description: string };
  devices: { side: 'positive' | 'negative'; position: number; name: string; nominalVf: number; measuredVf: number | null }[];
  testCurrentMa: number;
  profile: SheetProfile;
  qa: {
    currentDrawMa: number | null;
    measuredThdPercent: number | null;
    /** dBc of H1…H8 read from the bench capture at the reference setting; null when the THD was typed. */
    measuredHarmonicsDbc: number[] | null;
    measuredThdRPercent: number | null;
    predictedThdPercent: number;
    tolerancePercent: number;
    verdict: 'passed' | 'failed' | 'not tested';
  } | null;
  power: { supplyV: number; currentMa: number | null };
  verifyUrl: string;
  /** Fixed to the unit's test date, so regenerating gives the same document. */
  issuedAt: Date;
}
