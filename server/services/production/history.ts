import type { Knex } from 'knex';
import { conflict, notFound } from '../../errors';
import { UNIT_STATE_LABELS, UNIT_TRANSITIONS, type UnitState } from '../../../shared/production/states';
import { lockBatchRow, lockUnitRows } from '../stock/ledger';

type Db = Knex | Knex.Transaction;

/** Records something that happened to a unit in its history. */
export async function unitEvent(trx: Db, unitId: number, kind: string, message: string, userId: number | null, from?: UnitState, to?: UnitState) {
  await trx('unit_events').insert({ unit_id: unitId, kind, message, user_id: userId, from_state: from ?? null, to_state: to ?? null });
}

/** Locks a unit row for the rest of the transaction (after its batch, if the caller needs that too). */
export async function lockUnit(trx: Knex.Transaction, unitId: number) {
  const [unit] = await lockUnitRows(trx, [unitId]);
  if (!unit) throw notFound('No such unit');
  return unit;
}

/**
 * Locks a unit's batch, then the unit (the ledger's lock order), for work that changes both: kitting,
 * cancelling, starting a build, a pass that may close the batch. A unit never changes batch, so
 * reading its batch id before the locks is safe.
 */
export async function lockUnitWithBatch(trx: Knex.Transaction, unitId: number) {
  const peek = await trx('units').where({ id: unitId }).first('batch_id');
  if (!peek) throw notFound('No such unit');
  const batch = await lockBatchRow(trx, peek.batch_id);
  const unit = await lockUnit(trx, unitId);
  return { unit, batch };
}

/** Moves a locked unit to a new state (409 when not allowed) and records it. */
export async function transitionUnit(trx: Knex.Transaction, unit: { id: number; serial: string; state: UnitState }, to: UnitState, userId: number | null, message = '', patch: Record<string, unknown> = {}) {
  if (!UNIT_TRANSITIONS[unit.state].includes(to)) {
    throw conflict(`Unit ${unit.serial} is ${UNIT_STATE_LABELS[unit.state].toLowerCase()}: it cannot become ${UNIT_STATE_LABELS[to].toLowerCase()}`);
  }
  await trx('units').where({ id: unit.id }).update({ ...patch, state: to, updated_at: trx.fn.now() });
  await unitEvent(trx, unit.id, 'state-change', message, userId, unit.state, to);
  unit.state = to;
}
