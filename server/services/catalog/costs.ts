// BOM cost roll-up: parts at their unit cost plus labour (standard minutes × the shop's hourly rate),
// and per clipping option the cost of its devices' linked parts. Also flags options whose devices
// have no linked part or too little stock to build one unit.
import type { Knex } from 'knex';
import type { StringDeviceView } from './options-data';

type Db = Knex | Knex.Transaction;

export interface RevisionCost {
  partsCents: number;
  labourMinutes: number;
  labourCents: number;
  totalCents: number;
}

/** Roll-ups of several revisions at once, keyed by revision id. */
export async function revisionCosts(db: Db, revisionIds: number[], labourCentsPerHour: number): Promise<Map<number, RevisionCost>> {
  const out = new Map<number, RevisionCost>();
  if (revisionIds.length === 0) return out;
  const parts = await db('bom_lines as b').join('parts as p', 'p.id', 'b.part_id').whereIn('b.revision_id', revisionIds)
    .groupBy('b.revision_id').select('b.revision_id').sum({ cents: db.raw('b.quantity * p.unit_cost_cents') }) as unknown as { revision_id: number; cents: string }[];
  const labour = await db('build_steps').whereIn('revision_id', revisionIds).groupBy('revision_id')
    .select('revision_id').sum({ minutes: 'standard_minutes' }) as unknown as { revision_id: number; minutes: string }[];
  for (const id of revisionIds) {
    const partsCents = Number(parts.find((r) => r.revision_id === id)?.cents ?? 0);
    const labourMinutes = Number(labour.find((r) => r.revision_id === id)?.minutes ?? 0);
    const labourCents = Math.round((labourMinutes * labourCentsPerHour) / 60);
    out.set(id, { partsCents, labourMinutes, labourCents, totalCents: partsCents + labourCents });
  }
  return out;
}

export interface OptionDeltaLine {
  partId: number;
  partNumber: string;
  quantity: number;
  unitCostCents: number;
  available: number;
}

export interface OptionDelta {
  lines: OptionDeltaLine[];
  deviceCents: number;
  /** Human-readable problems, e.g. "LED, white has no linked part". Empty when buildable. */
  flags: string[];
}

/** The BOM delta an option adds: one linked part per device in its strings. */
export async function optionDeltas(db: Db, strings: Map<number, { positive: StringDeviceView[]; negative: StringDeviceView[] }>): Promise<Map<number, OptionDelta>> {
  const partIds = new Set<number>();
  for (const s of strings.values()) for (const d of [...s.positive, ...s.negative]) if (d.partId) partIds.add(d.partId);
  const parts = partIds.size === 0 ? [] : await db('parts as p').join('part_stock as s', 's.part_id', 'p.id')
    .whereIn('p.id', [...partIds]).select('p.id', 'p.part_number', 'p.unit_cost_cents', 's.available');
  const byId = new Map(parts.map((p) => [p.id as number, p]));
  const out = new Map<number, OptionDelta>();
  for (const [optionId, s] of strings) {
    const counts = new Map<number, number>();
    const flags: string[] = [];
    for (const d of [...s.positive, ...s.negative]) {
      if (!d.partId) {
        if (!flags.includes(`${d.name} has no linked part`)) flags.push(`${d.name} has no linked part`);
        continue;
      }
      counts.set(d.partId, (counts.get(d.partId) ?? 0) + 1);
    }
    const lines: OptionDeltaLine[] = [];
    for (const [partId, quantity] of counts) {
      const p = byId.get(partId)!;
      lines.push({ partId, partNumber: p.part_number, quantity, unitCostCents: p.unit_cost_cents, available: p.available });
      if (p.available < quantity) flags.push(`${p.part_number}: ${p.available} available, ${quantity} needed per unit`);
    }
    if (s.positive.length + s.negative.length === 0) flags.push('No clipping devices chosen');
    out.set(optionId, { lines, deviceCents: lines.reduce((a, l) => a + l.quantity * l.unitCostCents, 0), flags });
  }
  return out;
}
