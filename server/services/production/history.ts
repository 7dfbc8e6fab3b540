import type { Knex } from 'knex';
import { conflict, notFound } from '../../errors';
import { UNIT_STATE_LABELS, UNIT_TRANSITIONS, type UnitState } from '../../../shared/production/states';

type Db = Knex | Knex.Transaction;

/** Records something that happened to a unit in its history. */
export async function unitEvent(trx: Db, unitId: number, kind: string, message: string, userId: number | null, from?: UnitState, to?: UnitState) {
  await trx('unit_events').insert({ unit_id: unitId, kind, message, user_id: userId, from_state: from ?? null, to_state: to ?? null });
}

/** Locks a unit row for the rest of the transaction. */
export async function lockUnit(trx: Knex.Transaction, unitId: number) {
  const unit = await trx('units').where({ id: unitId }).forUpdate().first();
  if (!unit) throw notFound('No such unit');
  return unit;
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
