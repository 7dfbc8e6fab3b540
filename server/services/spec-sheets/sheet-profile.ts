// The numbers a spec sheet prints, computed by the engine from this unit's measured devices.
import {
  clippingOnset, computeOperatingPoint, driveSweep, gainAtDrive, monteCarlo, perUnitCircuit, resolveCircuit,
  validateContractInput, type Circuit, type CircuitSpec, type ContractOutput, type MeasuredForwardVoltages,
} from '../../../shared/engine';
import { SPEC_SHEET_LAYOUT } from '../../../templates/pdf/spec-sheet-layout';

export interface SheetOperatingPoint {
  label: string;
  drive: number;
  /** dBc of H1…H8 (H1 is 0 by definition). */
  harmonicsDbc: number[];
  thdF: number;
  thdR: number;
  evenShare: number;
}

export interface SheetProfile {
  points: SheetOperatingPoint[];
  /** THD_F against drive for this unit (25 points). */
  sweep: { drive: number; thdF: number }[];
  /** The option's nominal P5…P95 band of THD_F against drive (Monte Carlo), or null. */
  band: NominalBand | null;
  clippingOnsetDrive: number | null;
  referenceDrive: number;
}

export type NominalBand = { drive: number; p5: number; p50: number; p95: number }[];

/** The contract input of one operating point of a circuit, so sheets print exactly what the CLI would. */
export function contractInputAt(circuit: Circuit, drive: number) {
  return {
    toneHz: circuit.toneHz, inputPeakV: circuit.drive.inputPeakV, driveGain: gainAtDrive(circuit.drive, drive),
    railPeakV: circuit.drive.railPeakV, temperatureC: circuit.temperatureC,
    clipper: circuit.network, harmonics: SPEC_SHEET_LAYOUT.harmonicsInThd,
  };
}

export function operatingPoint(circuit: Circuit, drive: number): ContractOutput {
  return computeOperatingPoint(validateContractInput(contractInputAt(circuit, drive)));
}

function evenShare(out: ContractOutput) {
  let even = 0;
  let all = 0;
  for (const h of out.harmonics) {
    if (h.order < 2) continue;
    all += h.peakV ** 2;
    if (h.order % 2 === 0) even += h.peakV ** 2;
  }
  return all > 0 ? even / all : 0;
}

/** The nominal tolerance band of an option over the drive range: the same for every unit of it, so callers cache it. */
export function nominalBand(spec: CircuitSpec, points = 7, draws = 40): NominalBand {
  const band: NominalBand = [];
  for (let i = 0; i < points; i++) {
    const drive = i / (points - 1);
    const mc = monteCarlo(spec, { draws, seed: 20261201, drive });
    band.push({ drive, p5: mc.thdF.p5, p50: mc.thdF.p50, p95: mc.thdF.p95 });
  }
  return band;
}

/** The unit's own profile from its measured forward voltages (IS refitted, N kept). */
export function sheetProfile(spec: CircuitSpec, measured: MeasuredForwardVoltages | null, band: NominalBand | null): SheetProfile {
  const nominal = resolveCircuit(spec);
  const circuit = measured ? perUnitCircuit(nominal, measured) : nominal;
  const points = SPEC_SHEET_LAYOUT.tableDrives.map(({ label, drive }) => {
    const d = drive ?? circuit.referenceDrive;
    const out = operatingPoint(circuit, d);
    return {
      label, drive: d,
      harmonicsDbc: out.harmonics.slice(0, SPEC_SHEET_LAYOUT.harmonicsInTable).map((h) => h.dbc),
      thdF: out.thdF, thdR: out.thdR, evenShare: evenShare(out),
    };
  });
  const sweep = driveSweep(circuit, 25);
  return {
    points,
    sweep: sweep.map((p) => ({ drive: p.drive, thdF: p.thdF })),
    band,
    clippingOnsetDrive: clippingOnset(sweep),
    referenceDrive: circuit.referenceDrive,
  };
}
