// Reading pedal models: customers and visitors see published models with published options only
// (never costs, stock or suppliers); staff see everything plus the cost roll-up.
import type { Knex } from 'knex';
import { notFound } from '../../errors';
import { getSettings } from '../settings';
import { optionDeltas, revisionCosts } from './costs';
import { driveOf, engineInput, loadStrings, type OptionRow, type RevisionRow } from './options-data';

type Db = Knex | Knex.Transaction;

interface ModelRow {
  id: number;
  name: string;
  sku: string;
  description: string;
  base_price_cents: number;
  published: boolean;
  photo_file_id: number | null;
  active_revision_id: number | null;
  updated_at: Date;
}

const photoUrl = (m: ModelRow) => (m.photo_file_id ? `/api/models/${m.id}/photo?v=${m.photo_file_id}` : null);

/** GET /api/models. */
export async function listModels(db: Db, staff: boolean) {
  const models: ModelRow[] = await db('models').modify((q) => { if (!staff) q.where({ published: true }); }).orderBy('name');
  const options: OptionRow[] = await db('clipping_options').whereIn('model_id', models.map((m) => m.id))
    .modify((q) => { if (!staff) q.where({ published: true }); }).orderBy(['model_id', 'position', 'id']);
  const revisions: RevisionRow[] = staff ? await db('model_revisions').whereIn('model_id', models.map((m) => m.id)) : [];
  let costs = new Map();
  let deltas = new Map();
  if (staff) {
    const settings = await getSettings(db);
    costs = await revisionCosts(db, models.flatMap((m) => (m.active_revision_id ? [m.active_revision_id] : [])), settings.labour_cents_per_hour);
    deltas = await optionDeltas(db, await loadStrings(db, options.map((o) => o.id)));
  }
  return models.map((m) => {
    const mine = options.filter((o) => o.model_id === m.id);
    const base = {
      id: m.id, name: m.name, sku: m.sku, description: m.description, basePriceCents: m.base_price_cents, photoUrl: photoUrl(m),
      options: mine.map((o) => ({
        id: o.id, code: o.code, name: o.name, description: o.description, surchargeCents: o.price_surcharge_cents,
        ...(staff ? { published: o.published, deviceCents: deltas.get(o.id)?.deviceCents ?? 0, flags: deltas.get(o.id)?.flags ?? [] } : {}),
      })),
    };
    if (!staff) return base;
    const active = revisions.find((r) => r.id === m.active_revision_id);
    return {
      ...base, published: m.published, revisionCount: revisions.filter((r) => r.model_id === m.id).length,
      activeRevision: active ? { id: active.id, number: active.number, label: active.label, frozen: active.frozen_at !== null } : null,
      cost: m.active_revision_id ? costs.get(m.active_revision_id) ?? null : null,
    };
  });
}

/** GET /api/models/:id: the active revision's drive stage and every (visible) option with its device strings and engine input. */
export async function getModel(db: Db, id: number, staff: boolean) {
  const m: ModelRow | undefined = await db('models').where({ id }).first();
  if (!m || (!staff && !m.published)) throw notFound('No such pedal model');
  const revisions: RevisionRow[] = await db('model_revisions').where({ model_id: id }).orderBy('number');
  const active = revisions.find((r) => r.id === m.active_revision_id) ?? null;
  const options: OptionRow[] = await db('clipping_options').where({ model_id: id })
    .modify((q) => { if (!staff) q.where({ published: true }); }).orderBy(['position', 'id']);
  const strings = await loadStrings(db, options.map((o) => o.id));
  const drive = active ? driveOf(active) : null;
  const settings = staff ? await getSettings(db) : null;
  const deltas = staff ? await optionDeltas(db, strings) : new Map();
  const costs = staff ? await revisionCosts(db, revisions.map((r) => r.id), settings!.labour_cents_per_hour) : new Map();
  const activeCost = active ? costs.get(active.id) : undefined;

  const optionViews = options.map((o) => {
    const s = strings.get(o.id)!;
    const strip = (d: (typeof s.positive)[number]) => {
      const { partId, ...pub } = d;
      return staff ? d : (void partId, pub);
    };
    const view = {
      id: o.id, code: o.code, name: o.name, description: o.description, topology: o.topology, network: o.network,
      surchargeCents: o.price_surcharge_cents, positive: s.positive.map(strip), negative: s.negative.map(strip),
      engineInput: drive ? engineInput(drive, o, s) : null,
    };
    if (!staff) return view;
    const delta = deltas.get(o.id)!;
    return {
      ...view, published: o.published, position: o.position, bomDelta: delta.lines, deviceCents: delta.deviceCents, flags: delta.flags,
      costCents: activeCost ? activeCost.totalCents + delta.deviceCents : null,
    };
  });
  const base = {
    id: m.id, name: m.name, sku: m.sku, description: m.description, basePriceCents: m.base_price_cents, photoUrl: photoUrl(m),
    activeRevision: active && drive ? { id: active.id, number: active.number, label: active.label, drive, frozen: active.frozen_at !== null } : null,
    options: optionViews,
  };
  if (!staff) return base;
  return {
    ...base, published: m.published, updatedAt: m.updated_at,
    cost: activeCost ?? null, labourCentsPerHour: settings!.labour_cents_per_hour,
    revisions: revisions.map((r) => ({
      id: r.id, number: r.number, label: r.label, notes: r.notes, drive: driveOf(r), frozenAt: r.frozen_at,
      copiedFromRevisionId: r.copied_from_revision_id, createdAt: r.created_at, active: r.id === m.active_revision_id,
      cost: costs.get(r.id) ?? null,
    })),
  };
}

/** GET /api/models/:id/photo: the stored image, for published models (staff: any). */
export async function getModelPhoto(db: Db, id: number, staff: boolean) {
  const m: ModelRow | undefined = await db('models').where({ id }).first();
  if (!m || (!staff && !m.published) || !m.photo_file_id) throw notFound('No photo for this pedal model');
  const f = await db('files').where({ id: m.photo_file_id }).first('content_type', 'data', 'size_bytes', 'filename');
  if (!f) throw notFound('No photo for this pedal model');
  return f as { content_type: string; data: Buffer; size_bytes: number; filename: string };
}
