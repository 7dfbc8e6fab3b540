import type { Knex } from 'knex';

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
  const perOption = await partsPerUnit(db, revisionId, [...units.keys()]);
  const base = new Map<number, number>(
    ((await db('bom_lines').where({ revision_id: revisionId }).select('part_id').sum({ q: 'quantity' }).groupBy('part_id')) as unknown as { part_id: number; q: string }[])
      .map((r: { part_id: number; q: string }) => [r.part_id, Number(r.q)]),
  );
  const totals = new Map<number, { base: number; option: number }>();
  for (const [optionId, count] of units) {
    for (const [partId, q] of perOption.get(optionId) ?? []) {
      const t = totals.get(partId) ?? { base: 0, option: 0 };
      const b = base.get(partId) ?? 0;
      t.base += b * count;
      t.option += (q - b) * count;
      totals.set(partId, t);
    }
  }
  if (totals.size === 0) return [];
  const partIds = [...totals.keys()];
  const parts = await db('parts as p').leftJoin('suppliers as s', 's.id', 'p.supplier_id').join('part_stock as ps', 'ps.part_id', 'p.id')
    .whereIn('p.id', partIds)
    .select('p.id', 'p.part_number', 'p.category', 'p.value', 'p.package', 'p.unit_cost_cents', 'p.lead_time_days', 's.name as supplier', 's.default_lead_time_days', 'ps.available');
  const held = batchId
    ? new Map<number, { reserved: number; consumed: number }>(
        ((await db('stock_movements').where({ batch_id: batchId }).whereIn('part_id', partIds).select('part_id')
          .sum({ reserved: 'reserved_delta' })
          .select(db.raw(`COALESCE(SUM(CASE WHEN kind = 'consume' THEN quantity ELSE 0 END), 0)::int AS consumed`))
          .groupBy('part_id')) as unknown as { part_id: number; reserved: string; consumed: number }[])
          .map((r: { part_id: number; reserved: string; consumed: number }) => [r.part_id, { reserved: Number(r.reserved), consumed: Number(r.consumed) }]),
      )
    : new Map();
  return parts
    .map((p: Record<string, unknown>) => {
      const t = totals.get(p.id as number)!;
      const h = held.get(p.id as number) ?? { reserved: 0, consumed: 0 };
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
    })
    .sort((a, b) => a.partNumber.localeCompare(b.partNumber));
}

/** The earliest day building can start: today if nothing is short, else after the longest lead time of a short part. */
export function earliestStart(rows: RequirementRow[], today = new Date()): { date: string; waitingOn: string | null } {
  const short = rows.filter((r) => r.shortage > 0).sort((a, b) => b.leadTimeDays - a.leadTimeDays);
  const days = short[0]?.leadTimeDays ?? 0;
  const date = new Date(today.getTime() + days * 86_400_000).toISOString().slice(0, 10);
  return { date, waitingOn: short[0]?.partNumber ?? null };
}
