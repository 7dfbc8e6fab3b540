import type { Knex } from 'knex';
import { optionCircuit } from '../../../shared/catalog/circuit';
import { forwardVoltage, type CircuitSpec, type DeviceModel } from '../../../shared/engine';
import { compute } from '../../compute/pool';

type Db = Knex | Knex.Transaction;

/** The option's devices in string order, with their SPICE parameters and kind. */
export async function optionDevices(db: Db, optionId: number) {
  const rows = await db('option_devices as od').join('devices as d', 'd.id', 'od.device_id').where('od.option_id', optionId)
    .select('od.id', 'od.side', 'od.position', 'd.id as device_id', 'd.name', 'd.kind', 'd.is_amps', 'd.n', 'd.rs_ohms', 'd.eg_ev', 'd.xti')
    .orderBy(['od.side', 'od.position']);
  return rows.map((r) => ({
    id: r.id as number, side: r.side as 'positive' | 'negative', position: r.position as number, deviceId: r.device_id as number, name: r.name as string, kind: r.kind as string,
    model: { is: r.is_amps, n: r.n, rs: r.rs_ohms, eg: r.eg_ev, xti: r.xti } as DeviceModel,
  }));
}

/** The engine's circuit for a revision's drive stage with an option's devices, through the catalog's one mapping (shared/catalog/circuit.ts). */
export async function circuitFor(db: Db, revisionId: number, optionId: number): Promise<{ spec: CircuitSpec; devices: Awaited<ReturnType<typeof optionDevices>> }> {
  const revision = await db('model_revisions').where({ id: revisionId }).first();
  const option = await db('clipping_options').where({ id: optionId }).first();
  const devices = await optionDevices(db, optionId);
  const network = typeof option.network === 'string' ? JSON.parse(option.network) : option.network;
  const string = (side: 'positive' | 'negative') => devices.filter((d) => d.side === side).map((d) => ({ is: d.model.is, n: d.model.n, rs: d.model.rs ?? 0, eg: d.model.eg, xti: d.model.xti }));
  return {
    devices,
    spec: optionCircuit(
      { minGain: revision.drive_min_gain, maxGain: revision.drive_max_gain, taper: revision.drive_taper === 'linear' ? 'linear' : 'audio', inputPeakV: revision.input_peak_v, supplyV: revision.supply_v, referenceDrive: revision.reference_drive },
      { topology: option.topology, network, positive: string('positive'), negative: string('negative') },
    ),
  };
}

/** Nominal Vf of a device at the bench current, e.g. ≈ 0.6 V for a small-signal silicon diode at 1 mA. */
export const nominalVf = (model: DeviceModel, testCurrentMa: number) => forwardVoltage(model, testCurrentMa / 1000);

/**
 * This unit's predicted profile: IS of each fitted device refitted from its measured Vf (N kept),
 * then the full profile recomputed in the compute pool. `measured` maps option_device id → volts;
 * missing ones stay nominal.
 */
export async function predictUnit(db: Db, revisionId: number, optionId: number, measured: Map<number, number>, testCurrentMa: number) {
  const { spec, devices } = await circuitFor(db, revisionId, optionId);
  const profile = await compute.unitPrediction({
    spec, testCurrentA: testCurrentMa / 1000,
    devices: devices.map((d) => ({ side: d.side, model: d.model, measuredVf: measured.get(d.id) ?? null })),
  });
  return { ...profile, fromMeasuredVf: measured.size > 0, computedAt: new Date().toISOString() };
}
