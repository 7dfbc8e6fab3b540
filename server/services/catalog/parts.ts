// Parts: the list with server-side search, filter, sort and pages; create and edit; CSV export.
import type { Knex } from 'knex';
import { stringify } from 'csv-stringify/sync';
import type { PartInput, PartListQuery } from '../../../shared/schemas/catalog';
import { conflict, invalid, isUniqueViolation, notFound } from '../../errors';
import { cappedCount, containsPattern } from '../../http/paged';
import { movementHistory } from './stock';

const SORT_COLUMNS: Record<PartListQuery['sort'], string> = {
  partNumber: 'p.part_number', category: 'p.category', value: 'p.value', unitCostCents: 'p.unit_cost_cents',
  onHand: 's.on_hand', available: 's.available', reorderPoint: 'p.reorder_point', binLocation: 'p.bin_location',
};

function baseQuery(knex: Knex, q: Pick<PartListQuery, 'q' | 'category' | 'lowStock'>) {
  return knex('parts as p').join('part_stock as s', 's.part_id', 'p.id').leftJoin('suppliers as sup', 'sup.id', 'p.supplier_id')
    .modify((b) => {
      if (q.q) {
        const like = containsPattern(q.q);
        b.where((w) => w.whereILike('p.part_number', like).orWhereILike('p.value', like).orWhereILike('p.manufacturer_part_number', like).orWhereILike('p.bin_location', like));
      }
      if (q.category) b.where('p.category', q.category);
      if (q.lowStock) b.whereRaw('s.available < p.reorder_point');
    });
}

const COLUMNS = ['p.id', 'p.part_number', 'p.category', 'p.value', 'p.package', 'p.manufacturer_part_number', 'p.supplier_id', 'sup.name as supplier_name',
  'p.unit_cost_cents', 'p.lead_time_days', 'p.reorder_point', 'p.bin_location', 'p.notes', 's.on_hand', 's.reserved', 's.available'];

export interface PartView {
  id: number; partNumber: string; category: string; value: string; package: string; manufacturerPartNumber: string;
  supplierId: number | null; supplierName: string | null; unitCostCents: number; leadTimeDays: number; reorderPoint: number;
  binLocation: string; notes: string; onHand: number; reserved: number; available: number; lowStock: boolean;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
function view(r: any): PartView {
  return {
    id: r.id, partNumber: r.part_number, category: r.category, value: r.value, package: r.package, manufacturerPartNumber: r.manufacturer_part_number,
    supplierId: r.supplier_id, supplierName: r.supplier_name, unitCostCents: r.unit_cost_cents, leadTimeDays: r.lead_time_days,
    reorderPoint: r.reorder_point, binLocation: r.bin_location, notes: r.notes, onHand: r.on_hand, reserved: r.reserved,
    available: r.available, lowStock: r.available < r.reorder_point,
  };
}

/** GET /api/parts: one page, the total count, and how many are below their reorder point overall. */
export async function listParts(knex: Knex, q: PartListQuery) {
  const { total, totalCapped } = await cappedCount(baseQuery(knex, q));
  const [{ low }] = await baseQuery(knex, { category: undefined, lowStock: true }).count<{ low: number }[]>('* as low');
  const rows = await baseQuery(knex, q).select(COLUMNS)
    .orderBy([{ column: SORT_COLUMNS[q.sort], order: q.dir }, { column: 'p.id', order: 'asc' }])
    .limit(q.pageSize).offset((q.page - 1) * q.pageSize);
  return { items: rows.map(view), total, totalCapped, lowStockTotal: Number(low), page: q.page, pageSize: q.pageSize };
}

export async function getPart(knex: Knex, id: number) {
  const row = await baseQuery(knex, { category: undefined, lowStock: false }).where('p.id', id).first(COLUMNS);
  if (!row) throw notFound('No such part');
  return { ...view(row), movements: await movementHistory(knex, id, 200) };
}

function toRow(p: Partial<PartInput>) {
  const map: Record<string, unknown> = {
    part_number: p.partNumber, category: p.category, value: p.value, package: p.package, manufacturer_part_number: p.manufacturerPartNumber,
    supplier_id: p.supplierId, unit_cost_cents: p.unitCostCents, lead_time_days: p.leadTimeDays, reorder_point: p.reorderPoint,
    bin_location: p.binLocation, notes: p.notes,
  };
  return Object.fromEntries(Object.entries(map).filter(([, v]) => v !== undefined));
}

async function checkSupplier(knex: Knex, id: number | null | undefined) {
  if (id && !(await knex('suppliers').where({ id }).first('id'))) throw invalid('Choose a supplier from the list', { supplierId: 'No such supplier' });
}

export async function createPart(knex: Knex, input: PartInput) {
  await checkSupplier(knex, input.supplierId);
  try {
    const [row] = await knex('parts').insert(toRow(input)).returning('id');
    return getPart(knex, row.id);
  } catch (e) {
    if (isUniqueViolation(e)) throw invalid('That part number is taken', { partNumber: `${input.partNumber} already exists` });
    throw e;
  }
}

export async function updatePart(knex: Knex, id: number, input: Partial<PartInput>) {
  await checkSupplier(knex, input.supplierId);
  try {
    const n = await knex('parts').where({ id }).update({ ...toRow(input), updated_at: knex.fn.now() });
    if (n === 0) throw notFound('No such part');
  } catch (e) {
    if (isUniqueViolation(e)) throw conflict(`Part number ${input.partNumber} already exists`);
    throw e;
  }
  return getPart(knex, id);
}

export const listSuppliers = (knex: Knex) => knex('suppliers').orderBy('name').select('id', 'name', 'email', 'website', 'default_lead_time_days as defaultLeadTimeDays');

/** CSV of the whole (filtered) parts list, every row, in the list's sort order. */
export async function partsCsv(knex: Knex, q: PartListQuery): Promise<string> {
  const rows = (await baseQuery(knex, q).select(COLUMNS).orderBy([{ column: SORT_COLUMNS[q.sort], order: q.dir }, { column: 'p.id', order: 'asc' }])).map(view);
  return stringify(rows.map((p: PartView) => [p.partNumber, p.category, p.value, p.package, p.manufacturerPartNumber, p.supplierName ?? '', (p.unitCostCents / 100).toFixed(2),
    p.leadTimeDays, p.reorderPoint, p.binLocation, p.onHand, p.reserved, p.available, p.lowStock ? 'yes' : 'no']), {
    header: true,
    columns: ['part number', 'category', 'value', 'package', 'manufacturer part number', 'supplier', 'unit cost', 'lead time days', 'reorder point', 'bin', 'on hand', 'reserved', 'available', 'below reorder point'],
  });
}

/** CSV of the movement history (one part, or all), newest first, times in UTC ISO 8601. */
export async function movementsCsv(knex: Knex, partId?: number): Promise<string> {
  const rows = await movementHistory(knex, partId, 100_000);
  return stringify(rows.map((m: Awaited<ReturnType<typeof movementHistory>>[number]) => [new Date(m.created_at).toISOString(), m.part_number, m.kind, m.quantity, m.on_hand_delta, m.reserved_delta, m.reason, m.reference, m.batch_id ?? '', m.unit_id ?? '', m.user_name ?? '']), {
    header: true,
    columns: ['time (UTC)', 'part number', 'kind', 'quantity', 'on-hand change', 'reserved change', 'reason', 'reference', 'batch', 'unit', 'by'],
  });
}
