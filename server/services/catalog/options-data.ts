// Clipping options with their device strings, as the read APIs and the cost roll-up need them.
import type { Knex } from 'knex';
import { forwardVoltageCard } from '../../../shared/engine/index';
import { optionCircuit, optionContractInput, type DriveStageValues, type NetworkValues, type OptionTopology } from '../../../shared/catalog/circuit';

type Db = Knex | Knex.Transaction;

export interface StringDeviceView {
  deviceId: number;
  name: string;
  kind: string;
  presetKey: string | null;
  is: number;
  n: number;
  rs: number;
  eg: number;
  xti: number;
  vfAt1mA: number;
  vfAt10mA: number;
  partId: number | null;
}

export interface OptionRow {
  id: number;
  model_id: number;
  code: string;
  name: string;
  description: string;
  topology: OptionTopology;
  network: NetworkValues;
  price_surcharge_cents: number;
  published: boolean;
  position: number;
}

export interface DeviceRow {
  id: number;
  name: string;
  kind: string;
  preset_key: string | null;
  is_amps: number;
  n: number;
  rs_ohms: number;
  eg_ev: number;
  xti: number;
  part_id: number | null;
}

export function deviceView(d: DeviceRow): StringDeviceView {
  const card = forwardVoltageCard({ is: d.is_amps, n: d.n, rs: d.rs_ohms, eg: d.eg_ev, xti: d.xti });
  return {
    deviceId: d.id, name: d.name, kind: d.kind, presetKey: d.preset_key, is: d.is_amps, n: d.n, rs: d.rs_ohms,
    eg: d.eg_ev, xti: d.xti, vfAt1mA: card.atOneMilliamp, vfAt10mA: card.atTenMilliamps, partId: d.part_id,
  };
}

/** Device strings of the given options, keyed by option id, each side in series order. */
export async function loadStrings(db: Db, optionIds: number[]) {
  const rows = optionIds.length === 0 ? [] : await db('option_devices as od')
    .join('devices as d', 'd.id', 'od.device_id')
    .whereIn('od.option_id', optionIds)
    .orderBy([{ column: 'od.option_id' }, { column: 'od.side' }, { column: 'od.position' }])
    .select('od.option_id', 'od.side', 'd.id', 'd.name', 'd.kind', 'd.preset_key', 'd.is_amps', 'd.n', 'd.rs_ohms', 'd.eg_ev', 'd.xti', 'd.part_id');
  const out = new Map<number, { positive: StringDeviceView[]; negative: StringDeviceView[] }>();
  for (const id of optionIds) out.set(id, { positive: [], negative: [] });
  for (const r of rows as (DeviceRow & { option_id: number; side: 'positive' | 'negative' })[]) {
    out.get(r.option_id)![r.side].push(deviceView(r));
  }
  return out;
}

/** Both engine inputs for an option on a revision's drive stage (see shared/catalog/circuit.ts). */
export function engineInput(drive: DriveStageValues, o: { topology: OptionTopology; network: NetworkValues }, strings: { positive: StringDeviceView[]; negative: StringDeviceView[] }) {
  const source = { topology: o.topology, network: o.network, positive: strings.positive, negative: strings.negative };
  return { circuit: optionCircuit(drive, source), contract: optionContractInput(drive, source) };
}

export interface RevisionRow {
  id: number;
  model_id: number;
  number: number;
  label: string;
  notes: string;
  drive_min_gain: number;
  drive_max_gain: number;
  drive_taper: 'audio' | 'linear';
  input_peak_v: number;
  supply_v: number;
  reference_drive: number;
  frozen_at: Date | null;
  copied_from_revision_id: number | null;
  created_at: Date;
}

export function driveOf(r: RevisionRow): DriveStageValues {
  return {
    minGain: r.drive_min_gain, maxGain: r.drive_max_gain, taper: r.drive_taper,
    inputPeakV: r.input_peak_v, supplyV: r.supply_v, referenceDrive: r.reference_drive,
  };
}
