// Model revisions: copy-on-write. A revision a released batch uses is frozen (frozen_at set by
// production); every edit of it or of its BOM and steps is refused with 409, and the way forward is
// a new revision started from it.
import type { Knex } from 'knex';
import type { DriveStageInput } from '../../../shared/schemas/catalog';
import { conflict, invalid, notFound } from '../../errors';
import { getSettings } from '../settings';
import { revisionCosts } from './costs';
import { driveOf, type RevisionRow } from './options-data';

type Db = Knex | Knex.Transaction;

/** Locks the revision row and refuses when frozen; call inside the editing transaction. */
export async function lockEditable(trx: Knex.Transaction, revisionId: number): Promise<RevisionRow> {
  const r: RevisionRow | undefined = await trx('model_revisions').where({ id: revisionId }).forUpdate().first();
  if (!r) throw notFound('No such revision');
  if (r.frozen_at) {
    const [{ max }] = await trx('model_revisions').where({ model_id: r.model_id }).max<{ max: number }[]>('number as max');
    throw conflict(`Revision ${r.number} is frozen: a released batch was built from it. Start revision ${Number(max) + 1} from it to make changes.`);
  }
  return r;
}

/** GET /api/revisions/:id: drive stage, BOM with parts and stock, build steps, cost. */
export async function getRevision(db: Db, id: number) {
  const r: RevisionRow | undefined = await db('model_revisions').where({ id }).first();
  if (!r) throw notFound('No such revision');
  const model = await db('models').where({ id: r.model_id }).first('id', 'name', 'active_revision_id');
  const lines = await db('bom_lines as b').join('parts as p', 'p.id', 'b.part_id').join('part_stock as s', 's.part_id', 'p.id')
    .where('b.revision_id', id).orderBy(['b.position', 'b.id'])
    .select('b.id', 'b.part_id as partId', 'p.part_number as partNumber', 'p.category', 'p.value', 'b.quantity', 'b.designators', 'b.notes',
      'b.needs_lot as needsLot', 'p.unit_cost_cents as unitCostCents', 's.available');
  const steps = await db('build_steps').where({ revision_id: id }).orderBy('position')
    .select('id', 'position', 'title', 'instructions', 'standard_minutes as standardMinutes', 'skill', 'safety_note as safetyNote', 'soldering');
  const settings = await getSettings(db);
  const cost = (await revisionCosts(db, [id], settings.labour_cents_per_hour)).get(id)!;
  const maxNumber = await db('model_revisions').where({ model_id: r.model_id }).max<{ max: number }[]>('number as max');
  return {
    id: r.id, modelId: r.model_id, modelName: model.name, number: r.number, label: r.label, notes: r.notes, drive: driveOf(r),
    frozenAt: r.frozen_at, frozen: r.frozen_at !== null, active: model.active_revision_id === r.id, copiedFromRevisionId: r.copied_from_revision_id,
    nextNumber: Number(maxNumber[0].max) + 1, lines, steps, cost, labourCentsPerHour: settings.labour_cents_per_hour,
  };
}

/** PATCH /api/revisions/:id: label, notes and drive-stage values. */
export async function updateRevision(knex: Knex, id: number, input: DriveStageInput) {
  await knex.transaction(async (trx) => {
    const r = await lockEditable(trx, id);
    const minGain = input.minGain ?? r.drive_min_gain;
    const maxGain = input.maxGain ?? r.drive_max_gain;
    if (maxGain < minGain) throw invalid('The gain range is upside down', { maxGain: `Maximum gain must be at least the minimum (${minGain})` });
    const patch: Record<string, unknown> = {
      label: input.label, notes: input.notes, drive_min_gain: input.minGain, drive_max_gain: input.maxGain, drive_taper: input.taper,
      input_peak_v: input.inputPeakV, supply_v: input.supplyV, reference_drive: input.referenceDrive,
    };
    const row = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined));
    if (Object.keys(row).length) await trx('model_revisions').where({ id }).update(row);
  });
  return getRevision(knex, id);
}

/** POST /api/models/:id/revisions: revision N+1 as a copy (drive stage, BOM, steps) of the one given. */
export async function startRevisionFrom(knex: Knex, modelId: number, fromRevisionId: number) {
  const id = await knex.transaction(async (trx) => {
    const model = await trx('models').where({ id: modelId }).forUpdate().first('id');
    if (!model) throw notFound('No such pedal model');
    const from: RevisionRow | undefined = await trx('model_revisions').where({ id: fromRevisionId, model_id: modelId }).first();
    if (!from) throw invalid('Choose a revision of this model to start from', { fromRevisionId: 'Not a revision of this model' });
    const [{ max }] = await trx('model_revisions').where({ model_id: modelId }).max<{ max: number }[]>('number as max');
    const [created] = await trx('model_revisions').insert({
      model_id: modelId, number: Number(max) + 1, label: `From revision ${from.number}`, notes: from.notes,
      drive_min_gain: from.drive_min_gain, drive_max_gain: from.drive_max_gain, drive_taper: from.drive_taper,
      input_peak_v: from.input_peak_v, supply_v: from.supply_v, reference_drive: from.reference_drive, copied_from_revision_id: from.id,
    }).returning('id');
    await trx.raw(`INSERT INTO bom_lines (revision_id, part_id, quantity, designators, notes, needs_lot, position)
      SELECT ?, part_id, quantity, designators, notes, needs_lot, position FROM bom_lines WHERE revision_id = ?`, [created.id, from.id]);
    await trx.raw(`INSERT INTO build_steps (revision_id, position, title, instructions, standard_minutes, skill, safety_note, soldering)
      SELECT ?, position, title, instructions, standard_minutes, skill, safety_note, soldering FROM build_steps WHERE revision_id = ?`, [created.id, from.id]);
    return created.id as number;
  });
  return getRevision(knex, id);
}

/** POST /api/revisions/:id/activate: new orders and batches use this revision from now on. */
export async function activateRevision(knex: Knex, id: number) {
  const r = await knex('model_revisions').where({ id }).first('model_id');
  if (!r) throw notFound('No such revision');
  if ((await knex('bom_lines').where({ revision_id: id }).count<{ c: number }[]>('* as c'))[0].c === 0) {
    throw conflict('A revision with an empty BOM cannot be made active');
  }
  await knex('models').where({ id: r.model_id }).update({ active_revision_id: id, updated_at: knex.fn.now() });
  return getRevision(knex, id);
}
