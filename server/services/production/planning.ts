import type { Knex } from 'knex';
import { stringify } from 'csv-stringify/sync';
import type { AddBatchLinesInput, BatchListQuery, CandidateLinesQuery, CreateBatchInput } from '../../../shared/schemas/production';
import { containsPattern, paged } from '../../http/paged';
import { BATCH_STATE_LABELS, BATCH_TRANSITIONS, type BatchState } from '../../../shared/production/states';
import { batchLabel } from '../../../shared/production/serials';
import { conflict, invalid, notFound } from '../../errors';
import { lockBatchRow } from '../stock/ledger';
import { slotLabelsFor } from './matching';
import { earliestStart, explodeBom } from './requirements';
import { inConstants } from '../../db/prepared';
import { lookupJoin } from '../../db/lookup-join';

type Db = Knex | Knex.Transaction;

/**
 * Paid orders' lines not in a batch, as `o` (the order) and `l` (id, model_id, option_id, quantity,
 * description). Reached from the few paid orders, never from every line outside a batch: lines
 * filled from stock stay so for good and grow with the history. OFFSET 0 keeps PostgreSQL from
 * folding the per-order lookup back into one scan of them all.
 */
export function paidLinesOutsideBatches(db: Db) {
  return db('orders as o').where(inConstants(db, 'o.state', ['paid']))
    .joinRaw(`CROSS JOIN LATERAL (SELECT l.id, l.model_id, l.option_id, l.quantity, l.description FROM order_lines l
      WHERE l.order_id = o.id AND l.batch_id IS NULL OFFSET 0) AS l`);
}

/** Revisions a batch can be planned for, with the paid order lines still waiting for a batch. */
const CANDIDATE_SORT: Record<CandidateLinesQuery['sort'], string> = { dueAt: 'o.due_at', number: 'o.id', customerName: 'u.name' };

/** What a new batch can be made of: every model revision with its options, and one page of the paid order lines waiting for a batch. */
export async function planningCandidates(db: Db, params: CandidateLinesQuery) {
  const revisions = await db('model_revisions as r').join('models as m', 'm.id', 'r.model_id')
    .select('r.id', 'r.number', 'r.label', 'r.frozen_at', 'm.id as model_id', 'm.name as model_name', 'm.active_revision_id')
    .orderBy(['m.name', { column: 'r.number', order: 'desc' }]);
  const options = await db('clipping_options').select('id', 'model_id', 'code', 'name').orderBy(['model_id', 'position', 'id']);
  // Every order has its customer (a foreign key, not null): the count looks customers up only to search.
  const base = (withCustomer = true) => {
    const q = paidLinesOutsideBatches(db)
      .whereNotExists((w) => w.select(db.raw('1')).from('batch_lines as bl').join('batches as b', 'b.id', 'bl.batch_id').whereRaw('bl.order_line_id = l.id').whereRaw("b.state <> 'cancelled'"));
    if (withCustomer) q.joinRaw(lookupJoin(db, 'users', 'u', ['name'], 'o.customer_id'));
    if (params.modelId) q.where('l.model_id', params.modelId);
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('o.number', like).orWhereILike('u.name', like).orWhereILike('l.description', like)); }
    return q;
  };
  const orderLines = await paged(params, {
    count: base(Boolean(params.q)),
    rows: base().select('l.id', 'l.model_id', 'l.option_id', 'l.quantity', 'l.description', 'o.number as order_number', 'o.due_at', 'u.name as customer_name'),
    sortColumns: CANDIDATE_SORT, tieBreak: 'l.id',
    map: (l: CandidateLineRow) => ({
      id: l.id, modelId: l.model_id, optionId: l.option_id, quantity: l.quantity, description: l.description,
      orderNumber: l.order_number, dueAt: l.due_at, customerName: l.customer_name,
    }),
  });
  return {
    revisions: revisions.map((r) => ({
      id: r.id, modelId: r.model_id, modelName: r.model_name, number: r.number, label: r.label,
      active: r.active_revision_id === r.id, frozen: r.frozen_at !== null,
      options: options.filter((o) => o.model_id === r.model_id).map((o) => ({ id: o.id, code: o.code, name: o.name })),
    })),
    orderLines,
  };
}

interface CandidateLineRow { id: number; model_id: number; option_id: number; quantity: number; description: string; order_number: string; due_at: Date | null; customer_name: string }

/**
 * Checks order lines and stock builds for a batch of `modelId` and gives the batch_lines rows for
 * them: every order line paid, of this model and in no other live batch; every option of this model.
 * Locks the order lines, so two planners cannot pull the same line into two batches.
 */
async function checkedLineRows(trx: Knex.Transaction, batchId: number | null, modelId: number, input: AddBatchLinesInput) {
  const lines = input.orderLineIds.length
    ? await trx('order_lines as l').join('orders as o', 'o.id', 'l.order_id').whereIn('l.id', input.orderLineIds).forUpdate('l')
        .select('l.id', 'l.model_id', 'l.option_id', 'l.quantity', 'l.batch_id', 'o.state', 'o.number')
    : [];
  if (lines.length !== new Set(input.orderLineIds).size) throw invalid('Some order lines do not exist', { orderLineIds: 'Unknown order line' });
  for (const l of lines) {
    if (l.model_id !== modelId) throw invalid(`Order ${l.number} is for another model`, { orderLineIds: 'A line is for another model' });
    if (l.state !== 'paid' || l.batch_id) throw conflict(`Order ${l.number} is not paid and waiting for a batch`);
  }
  const taken = input.orderLineIds.length
    ? await trx('batch_lines as bl').join('batches as b', 'b.id', 'bl.batch_id').whereIn('bl.order_line_id', input.orderLineIds).whereNot('b.state', 'cancelled').first('b.id')
    : null;
  if (taken) throw conflict(taken.id === batchId ? 'That order line is already in this batch' : 'An order line is already in another batch being planned');
  const optionIds = [...new Set(input.stockBuilds.map((s) => s.optionId))];
  const options = optionIds.length ? await trx('clipping_options').whereIn('id', optionIds).where({ model_id: modelId }) : [];
  if (options.length !== optionIds.length) throw invalid('A stock build names an option of another model', { stockBuilds: 'Unknown option for this model' });
  return [
    ...lines.map((l) => ({ option_id: l.option_id as number, order_line_id: l.id as number | null, quantity: l.quantity as number })),
    ...input.stockBuilds.map((s) => ({ option_id: s.optionId, order_line_id: null, quantity: s.quantity })),
  ];
}

/** A new batch in planning, pulling the given order lines and stock builds. All or nothing. */
export async function createBatch(knex: Knex, userId: number, input: CreateBatchInput) {
  return knex.transaction(async (trx) => {
    const revision = await trx('model_revisions').where({ id: input.revisionId }).first();
    if (!revision) throw invalid('Pick a model revision', { revisionId: 'No such revision' });
    const rows = await checkedLineRows(trx, null, revision.model_id, input);
    const [{ nextval }] = (await trx.raw("SELECT nextval('batch_number_seq')::int AS nextval")).rows;
    const [batch] = await trx('batches').insert({ number: nextval, revision_id: revision.id, created_by: userId, notes: input.notes }).returning('*');
    await trx('batch_lines').insert(rows.map((r) => ({ ...r, batch_id: batch.id })));
    return { id: batch.id as number, number: batch.number as number };
  });
}

/** A batch that may still change what it builds: locked (the ledger's lock order starts here) and still being planned, else 409. */
async function lockDraftBatch(trx: Knex.Transaction, batchId: number) {
  const batch = await lockBatch(trx, batchId);
  if (batch.state !== 'draft') throw conflict(`Batch ${batchLabel(batch.number)} is ${BATCH_STATE_LABELS[batch.state as BatchState].toLowerCase()}: only a batch being planned can change what it builds`);
  return batch;
}

/** Adds order lines and stock builds to a batch still being planned. All or nothing. */
export async function addBatchLines(knex: Knex, batchId: number, input: AddBatchLinesInput) {
  return knex.transaction(async (trx) => {
    const batch = await lockDraftBatch(trx, batchId);
    const revision = await trx('model_revisions').where({ id: batch.revision_id }).first('model_id');
    const rows = await checkedLineRows(trx, batchId, revision.model_id, input);
    const added = await trx('batch_lines').insert(rows.map((r) => ({ ...r, batch_id: batchId }))).returning('id');
    return { id: batchId, added: added.length, units: rows.reduce((n, r) => n + r.quantity, 0) };
  });
}

/** Takes one line (an order line or a stock build) out of a batch still being planned; the last line cannot go. */
export async function removeBatchLine(knex: Knex, batchId: number, lineId: number) {
  return knex.transaction(async (trx) => {
    const batch = await lockDraftBatch(trx, batchId);
    const line = await trx('batch_lines').where({ id: lineId, batch_id: batchId }).first();
    if (!line) throw notFound('No such line in this batch');
    const others = await trx('batch_lines').where({ batch_id: batchId }).whereNot({ id: lineId }).count({ n: '*' }).first();
    if (Number(others?.n ?? 0) === 0) throw conflict(`This is the last line of batch ${batchLabel(batch.number)}: add another first, or cancel the batch`);
    await trx('batch_lines').where({ id: lineId }).delete();
    return { id: batchId, removed: lineId, units: line.quantity as number };
  });
}

/** Locks a batch row first, as the ledger's lock order asks (server/services/stock/ledger.ts). */
export const lockBatch = lockBatchRow;

export function assertBatchTransition(batch: { number: number; state: BatchState }, to: BatchState) {
  if (!BATCH_TRANSITIONS[batch.state].includes(to)) {
    throw conflict(`Batch ${batchLabel(batch.number)} is ${BATCH_STATE_LABELS[batch.state].toLowerCase()}: it cannot become ${BATCH_STATE_LABELS[to].toLowerCase()}`);
  }
}

/** Units per option still to build: the lines while planning or releasing, else the open units not yet kitted. */
function openQuantities(state: BatchState, lines: { option_id: number; quantity: number }[], units: { option_id: number; state: string; kitted_at: unknown }[]) {
  const counts = new Map<number, number>();
  if (state === 'draft' || state === 'releasing') for (const l of lines) counts.set(l.option_id, (counts.get(l.option_id) ?? 0) + l.quantity);
  else for (const u of units) if (u.kitted_at === null && u.state !== 'cancelled') counts.set(u.option_id, (counts.get(u.option_id) ?? 0) + 1);
  return counts;
}

/** A batch with its lines, units, exploded BOM against stock, shortages and earliest start. */
export async function getBatch(db: Db, batchId: number) {
  const batch = await db('batches as b').join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
    .where('b.id', batchId).select('b.*', 'r.number as revision_number', 'r.label as revision_label', 'm.name as model_name', 'm.id as model_id').first();
  if (!batch) throw notFound('No such batch');
  const lines = await db('batch_lines as bl').join('clipping_options as c', 'c.id', 'bl.option_id')
    .leftJoin('order_lines as ol', 'ol.id', 'bl.order_line_id').leftJoin('orders as o', 'o.id', 'ol.order_id').leftJoin('users as cu', 'cu.id', 'o.customer_id')
    .where('bl.batch_id', batchId).select('bl.id', 'bl.quantity', 'bl.option_id', 'c.code', 'c.name as option_name', 'o.number as order_number', 'o.due_at',
      'o.state as order_state', 'cu.name as customer_name', 'cu.email as customer_email')
    .orderBy('bl.id');
  const units = await db('units as u').leftJoin('users as a', 'a.id', 'u.assembler_id').join('clipping_options as c', 'c.id', 'u.option_id')
    .leftJoin('orders as o', 'o.id', 'u.order_id')
    .where('u.batch_id', batchId)
    .select('u.id', 'u.serial', 'u.sequence', 'u.state', 'u.option_id', 'u.assembler_id', 'a.name as assembler_name', 'u.planned_date', 'u.kitted_at', 'c.code as option_code', 'o.number as order_number', 'o.due_at')
    .orderBy('u.sequence');
  const requirements = await explodeBom(db, batch.revision_id, openQuantities(batch.state, lines, units), batch.state === 'draft' ? null : batch.id);
  const slots = await slotLabelsFor(db, units.map((u) => u.id as number));
  return {
    batch: {
      id: batch.id, number: batch.number, label: batchLabel(batch.number), state: batch.state as BatchState,
      modelId: batch.model_id, modelName: batch.model_name, revisionId: batch.revision_id, revisionNumber: batch.revision_number, revisionLabel: batch.revision_label,
      notes: batch.notes, shortageOverrideReason: batch.shortage_override_reason, releasedAt: batch.released_at, plannedStart: batch.planned_start, createdAt: batch.created_at,
    },
    // Units made so far by a release (the release job's progress while the batch is 'releasing').
    release: batch.release_total === null ? null : { total: batch.release_total as number, done: batch.release_done as number, error: (batch.release_error as string | null) ?? null },
    lines: lines.map((l) => ({ id: l.id, quantity: l.quantity, optionId: l.option_id, optionCode: l.code, optionName: l.option_name, orderNumber: l.order_number, dueAt: l.due_at, customerName: l.customer_name })),
    // Who the release mails a ship date: one mail per order still paid and waiting (release.ts, finishRelease).
    customersToMail: batch.state === 'draft' ? customersToMail(lines) : [],
    units: units.map((u) => ({
      id: u.id, serial: u.serial, sequence: u.sequence, state: u.state, assemblerId: u.assembler_id, assemblerName: u.assembler_name,
      plannedDate: u.planned_date ? toDate(u.planned_date) : null, kitted: u.kitted_at !== null, optionCode: u.option_code, orderNumber: u.order_number, dueAt: u.due_at,
      // Tray slots matched into the unit: what the kit list says to take, e.g. ["T3-07", "T3-19"].
      slots: [...(slots.get(u.id)?.values() ?? [])].map((s) => s.label),
    })),
    requirements,
    earliestStart: earliestStart(requirements),
  };
}

function customersToMail(lines: { order_number: string | null; order_state: string | null; customer_name: string | null; customer_email: string | null }[]) {
  const byOrder = new Map<string, { orderNumber: string; name: string; email: string }>();
  for (const l of lines) {
    if (l.order_number && l.order_state && ['paid', 'scheduled'].includes(l.order_state)) {
      byOrder.set(l.order_number, { orderNumber: l.order_number, name: l.customer_name ?? '', email: l.customer_email ?? '' });
    }
  }
  return [...byOrder.values()];
}

export const toDate = (d: Date | string) => (typeof d === 'string' ? d.slice(0, 10) : new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 10));

const BATCH_SORT: Record<BatchListQuery['sort'], string> = { number: 'b.number', state: 'b.state', createdAt: 'b.created_at', modelName: 'm.name' };
interface BatchListRow { id: number; number: number; state: BatchState; released_at: Date | null; created_at: Date; model_name: string; revision_number: number }

/** Batches, one page at a time, newest first by default; filtered by state and a search (label or model). */
export async function listBatches(db: Db, params: BatchListQuery) {
  const base = () => {
    const q = db('batches as b').join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id');
    if (params.state) q.where('b.state', params.state);
    if (params.q) {
      const digits = params.q.replace(/^b/i, '');
      q.where((w) => {
        w.whereILike('m.name', containsPattern(params.q!));
        if (/^\d{1,9}$/.test(digits)) w.orWhere('b.number', Number(digits));
      });
    }
    return q;
  };
  const page = await paged(params, {
    count: base(),
    rows: base().select('b.id', 'b.number', 'b.state', 'b.released_at', 'b.created_at', 'm.name as model_name', 'r.number as revision_number'),
    sortColumns: BATCH_SORT, tieBreak: 'b.id',
    map: (b: BatchListRow) => ({ id: b.id, number: b.number, label: batchLabel(b.number), state: b.state, modelName: b.model_name, revisionNumber: b.revision_number, releasedAt: b.released_at, createdAt: b.created_at }),
  });
  // Unit counts of this page's batches in one grouped query.
  const sums = page.items.length
    ? await db('batch_lines').whereIn('batch_id', page.items.map((b) => b.id)).groupBy('batch_id').select('batch_id', db.raw('SUM(quantity)::int AS units'))
    : [];
  const units = new Map(sums.map((r: { batch_id: number; units: number }) => [r.batch_id, r.units]));
  return { ...page, items: page.items.map((b) => ({ ...b, units: units.get(b.id) ?? 0 })) };
}

/** What to buy for a batch's shortages, grouped by supplier, as CSV. */
export async function purchaseListCsv(db: Db, batchId: number) {
  const { batch, requirements } = await getBatch(db, batchId);
  const short = requirements.filter((r) => r.shortage > 0)
    .sort((a, b) => (a.supplier ?? '~').localeCompare(b.supplier ?? '~') || a.partNumber.localeCompare(b.partNumber));
  const rows = short.map((r) => [r.supplier ?? '(no supplier)', r.partNumber, r.description, r.shortage, r.leadTimeDays, (r.unitCostCents / 100).toFixed(2), ((r.unitCostCents * r.shortage) / 100).toFixed(2)]);
  return { filename: `purchase-list-${batch.label}.csv`, csv: stringify([['supplier', 'part_number', 'description', 'quantity', 'lead_time_days', 'unit_cost', 'line_cost'], ...rows]) };
}
