import type { Knex } from 'knex';
import { batchHoldingsMany } from '../stock/ledger';

type Db = Knex | Knex.Transaction;

/** Parts one unit of each option needs: the revision's base BOM plus the option's devices (its BOM delta). */
export async function partsPerUnit(db: Db, revisionId: number, optionIds: number[]) {
  const base = (await db('bom_lines').where({ revision_id: revisionId }).select('part_id').sum({ quantity: 'quantity' }).groupBy('part_id')) as unknown as { part_id: number; quantity: string }[];
  const delta = optionIds.length
    ? await db('option_devices as od').join('devices as d', 'd.id', 'od.device_id')
        .whereIn('od.option_id', optionIds).whereNotNull('d.part_id')
        .select('od.option_id', 'd.part_id').count({ quantity: '*' }).groupBy('od.option_id', 'd.part_id')
    : [];
  const byOption = new Map<number, Map<number, number>>();
  for (const optionId of optionIds) {
    const need = new Map<number, number>(base.map((b: { part_id: number; quantity: string }) => [b.part_id, Number(b.quantity)]));
    for (const d of delta as { option_id: number; part_id: number; quantity: string }[]) {
      if (d.option_id === optionId) need.set(d.part_id, (need.get(d.part_id) ?? 0) + Number(d.quantity));
    }
    byOption.set(optionId, need);
  }
  return byOption;
}

export interface RequirementRow {
  partId: number;
  partNumber: string;
  description: string;
  category: string;
  supplier: string | null;
  unitCostCents: number;
  leadTimeDays: number;
  /** Base BOM × all units. */
  baseQuantity: number;
  /** Option deltas × their units. */
  optionQuantity: number;
  required: number;
  available: number;
  reservedForBatch: number;
  consumedForBatch: number;
  shortage: number;
}

/**
 * The exploded BOM of a batch: base × units + each option's delta × its units, against the
 * stock ledger. `units` maps option id → units still to build (open, not kitted).
 */
export async function explodeBom(db: Db, revisionId: number, units: Map<number, number>, batchId: number | null): Promise<RequirementRow[]> {
  return (await explodeBoms(db, [{ revisionId, units, batchId }]))[0];
}

export interface BomRequest { revisionId: number; units: Map<number, number>; batchId: number | null }

/**
 * explodeBom for many batches at once in four queries (base BOMs, option deltas, parts with their
 * balance, batch holdings), whatever their number: the board asks for every live batch.
 */
export async function explodeBoms(db: Db, requests: BomRequest[]): Promise<RequirementRow[][]> {
  const revisionIds = [...new Set(requests.map((r) => r.revisionId))];
  const optionIds = [...new Set(requests.flatMap((r) => [...r.units.keys()]))];
  if (!requests.some((r) => r.units.size)) return requests.map(() => []);
  const [baseRows, deltaRows] = await Promise.all([
    db('bom_lines').whereIn('revision_id', revisionIds).select('revision_id', 'part_id').sum({ q: 'quantity' }).groupBy('revision_id', 'part_id') as unknown as Promise<{ revision_id: number; part_id: number; q: string }[]>,
    (optionIds.length
      ? db('option_devices as od').join('devices as d', 'd.id', 'od.device_id').whereIn('od.option_id', optionIds).whereNotNull('d.part_id')
          .select('od.option_id', 'd.part_id').count({ q: '*' }).groupBy('od.option_id', 'd.part_id')
      : Promise.resolve([])) as unknown as Promise<{ option_id: number; part_id: number; q: string }[]>,
  ]);
  const baseOf = new Map<number, Map<number, number>>(revisionIds.map((id) => [id, new Map()]));
  for (const r of baseRows) baseOf.get(r.revision_id)!.set(r.part_id, Number(r.q));
  const deltaOf = new Map<number, Map<number, number>>();
  for (const r of deltaRows) {
    if (!deltaOf.has(r.option_id)) deltaOf.set(r.option_id, new Map());
    deltaOf.get(r.option_id)!.set(r.part_id, Number(r.q));
  }
  // Per request: part → {base, option} quantities over its units.
  const totalsPerRequest = requests.map((req) => {
    const base = baseOf.get(req.revisionId)!;
    const totals = new Map<number, { base: number; option: number }>();
    const add = (partId: number, b: number, o: number) => {
      const t = totals.get(partId) ?? { base: 0, option: 0 };
      t.base += b;
      t.option += o;
      totals.set(partId, t);
    };
    for (const [optionId, count] of req.units) {
      for (const [partId, q] of base) add(partId, q * count, 0);
      for (const [partId, q] of deltaOf.get(optionId) ?? []) add(partId, 0, q * count);
    }
    return totals;
  });
  const partIds = [...new Set(totalsPerRequest.flatMap((t) => [...t.keys()]))];
  // Only batches with units still to build need their holdings (a finished batch's would be read for nothing).
  const batchIds = [...new Set(requests.filter((r) => r.units.size > 0).map((r) => r.batchId).filter((id): id is number => id !== null))];
  const [parts, heldRows] = await Promise.all([
    partIds.length
      ? db('parts as p').leftJoin('suppliers as s', 's.id', 'p.supplier_id').join('part_stock as ps', 'ps.part_id', 'p.id').whereIn('p.id', partIds)
          .select('p.id', 'p.part_number', 'p.category', 'p.value', 'p.package', 'p.unit_cost_cents', 'p.lead_time_days', 's.name as supplier', 'ps.available')
      : [],
    batchIds.length && partIds.length ? batchHoldingsMany(db, batchIds, partIds) : [],
  ]);
  const held = new Map(heldRows.map((h) => [`${h.batch_id}:${h.part_id}`, h]));
  return requests.map((req, i) => {
    const totals = totalsPerRequest[i];
    return (parts as Record<string, unknown>[]).filter((p) => totals.has(p.id as number)).map((p) => {
      const t = totals.get(p.id as number)!;
      const h = held.get(`${req.batchId}:${p.id}`) ?? { reserved: 0, consumed: 0 };
      const required = t.base + t.option;
      const available = Number(p.available);
      return {
        partId: p.id as number,
        partNumber: p.part_number as string,
        description: [p.value, p.package].filter(Boolean).join(' ') || (p.category as string),
        category: p.category as string,
        supplier: (p.supplier as string | null) ?? null,
        unitCostCents: p.unit_cost_cents as number,
        leadTimeDays: p.lead_time_days as number,
        baseQuantity: t.base,
        optionQuantity: t.option,
        required,
        available,
        reservedForBatch: h.reserved,
        consumedForBatch: h.consumed,
        // What is reserved for this batch already counts towards it.
        shortage: Math.max(0, required - h.reserved - available),
      };
    }).sort((a, b) => a.partNumber.localeCompare(b.partNumber));
  });
}

/** The earliest day building can start: today if nothing is short, else after the longest lead time of a short part. */
export function earliestStart(rows: RequirementRow[], today = new Date()): { date: string; waitingOn: string | null } {
  const short = rows.filter((r) => r.shortage > 0).sort((a, b) => b.leadTimeDays - a.leadTimeDays);
  const days = short[0]?.leadTimeDays ?? 0;
  const date = new Date(today.getTime() + days * 86_400_000).toISOString().slice(0, 10);
  return { date, waitingOn: short[0]?.partNumber ?? null };
}
