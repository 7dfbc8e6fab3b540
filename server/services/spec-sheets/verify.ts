// The public verification page: confirms a genuine unit and says nothing about who owns it.
import { createHash, timingSafeEqual } from 'node:crypto';
import type { Knex } from 'knex';
import { shopFormatter } from '../format';
import { getSettings } from '../settings';

export interface VerifiedUnit {
  serial: string;
  model: string;
  option: string;
  builtMonth: string | null;
  verdict: string;
  passed: boolean;
}

const VERDICTS: Record<string, string> = {
  passed: 'Passed its bench test',
  in_stock: 'Passed its bench test',
  shipped: 'Passed its bench test',
  built: 'Built, bench test still to come',
  rework: 'Back on the bench for rework',
  waiting: 'In production',
  building: 'In production',
  cancelled: 'Cancelled before completion: this unit was never sold',
};

const digest = (s: string) => createHash('sha256').update(s).digest();
/** Compares in constant time, so the answer's timing says nothing about how much of a code was right. */
const sameCode = (given: string, stored: string) => timingSafeEqual(digest(given), digest(stored));

/**
 * Only public facts about a unit (no order, customer or staff), or null for an unknown serial, or
 * for a unit with a code when the code given is not its own (the same answer, so guessing serials
 * learns nothing). Units made before codes existed are found by serial alone.
 */
export async function verifyUnit(knex: Knex, serial: string, code = ''): Promise<VerifiedUnit | null> {
  const row = await knex('units as u').join('batches as b', 'b.id', 'u.batch_id').join('model_revisions as r', 'r.id', 'b.revision_id')
    .join('models as m', 'm.id', 'r.model_id').join('clipping_options as c', 'c.id', 'u.option_id')
    .where('u.serial', serial).first('u.id', 'u.serial', 'u.state', 'u.verify_code', 'm.name as model', 'c.name as option');
  if (!row || (row.verify_code && !sameCode(code, row.verify_code))) return null;
  const built = await knex('unit_events').where({ unit_id: row.id, kind: 'state-change', to_state: 'built' }).orderBy('created_at').first('created_at');
  const settings = await getSettings(knex);
  return {
    serial: row.serial, model: row.model, option: row.option,
    builtMonth: built ? shopFormatter(settings).monthYear(built.created_at) : null,
    verdict: VERDICTS[row.state] ?? 'In production',
    passed: ['passed', 'in_stock', 'shipped'].includes(row.state),
  };
}

export async function shopName(knex: Knex) {
  return (await getSettings(knex)).shop_name;
}
