import type { Knex } from 'knex';
import { batchLabel } from '../../../shared/production/serials';
import { toDate } from './planning';
import { explodeBoms } from './requirements';
import { inConstants } from '../../db/prepared';
import { lookupJoin } from '../../db/lookup-join';

type Db = Knex | Knex.Transaction;

/** The production board: live batches with units by state, work per assembler, late units, shortages to chase. */
export async function productionBoard(db: Db, today = new Date().toISOString().slice(0, 10)) {
  const batches = await db('batches as b').join('model_revisions as r', 'r.id', 'b.revision_id').join('models as m', 'm.id', 'r.model_id')
    .where(inConstants(db, 'b.state', ['draft', 'released', 'on_bench'])).select('b.id', 'b.number', 'b.state', 'b.revision_id', 'm.name as model_name', 'r.number as revision_number').orderBy('b.number');
  // One pass over the live batches' units gives both the counts by state and the open (not kitted)
  // units per option; their shortages come from one set-based BOM explosion (no query per batch).
  const unitRows = (batches.length
    ? await db('units').whereIn('batch_id', batches.map((b) => b.id))
        .select('batch_id', 'state', 'option_id', db.raw('(kitted_at IS NULL) AS open')).count({ n: '*' }).groupBy('batch_id', 'state', 'option_id', db.raw('kitted_at IS NULL'))
    : []) as unknown as { batch_id: number; state: string; option_id: number; open: boolean; n: string }[];
  const counts = new Map<number, Record<string, number>>();
  const openUnits = new Map<number, Map<number, number>>();
  for (const r of unitRows) {
    const c = counts.get(r.batch_id) ?? {};
    c[r.state] = (c[r.state] ?? 0) + Number(r.n);
    counts.set(r.batch_id, c);
    if (r.open && r.state !== 'cancelled') {
      const o = openUnits.get(r.batch_id) ?? new Map<number, number>();
      o.set(r.option_id, (o.get(r.option_id) ?? 0) + Number(r.n));
      openUnits.set(r.batch_id, o);
    }
  }
  const live = batches.filter((x) => x.state !== 'draft');
  const exploded = await explodeBoms(db, live.map((b) => ({ revisionId: b.revision_id, units: openUnits.get(b.id) ?? new Map(), batchId: b.id })));
  const shortages: { batch: string; partNumber: string; description: string; shortage: number; supplier: string | null }[] = [];
  live.forEach((b, i) => {
    for (const r of exploded[i].filter((x) => x.shortage > 0)) shortages.push({ batch: batchLabel(b.number), partNumber: r.partNumber, description: r.description, shortage: r.shortage, supplier: r.supplier });
  });
  const wip = await db('users as u').leftJoin('units as x', function join() { this.on('x.assembler_id', 'u.id').andOn(inConstants(db, 'x.state', ['waiting', 'building', 'rework'])); })
    .where(inConstants(db, 'u.role', ['assembler'])).whereRaw('u.active').groupBy('u.id', 'u.name').orderBy('u.name')
    .select('u.id', 'u.name')
    .select(db.raw("COUNT(x.id) FILTER (WHERE x.state = 'waiting')::int AS waiting"))
    .select(db.raw("COUNT(x.id) FILTER (WHERE x.state = 'building')::int AS building"))
    .select(db.raw("COUNT(x.id) FILTER (WHERE x.state = 'rework')::int AS rework"));
  // Units in work are few whatever the history; each one's order is looked up by its key.
  const late = await db('units as u').leftJoin('users as a', 'a.id', 'u.assembler_id')
    .joinRaw(lookupJoin(db, 'orders', 'o', ['number', 'due_at'], 'u.order_id'))
    .where(inConstants(db, 'u.state', ['waiting', 'building', 'rework', 'built']))
    .where((q) => q.where('u.planned_date', '<', today).orWhere('o.due_at', '<', today))
    .select('u.id', 'u.serial', 'u.state', 'u.planned_date', 'a.name as assembler_name', 'o.number as order_number', 'o.due_at').orderBy('u.planned_date').limit(50, { skipBinding: true });
  return {
    batches: batches.map((b) => ({
      id: b.id, label: batchLabel(b.number), state: b.state, modelName: b.model_name, revisionNumber: b.revision_number,
      units: counts.get(b.id) ?? {},
    })),
    wip,
    late: late.map((u) => ({ id: u.id, serial: u.serial, state: u.state, plannedDate: u.planned_date ? toDate(u.planned_date) : null, assemblerName: u.assembler_name, orderNumber: u.order_number, dueAt: u.due_at })),
    shortages,
  };
}
