import type { Knex } from 'knex';
import { DEVICE_PRESETS } from '../shared/engine/index';
import { DEMO_PARTS, DEMO_SUPPLIERS } from '../server/services/catalog/demo/parts';
import { DEMO_MODELS, demoLineNeedsLot, PRESET_PARTS, type DemoBomLine } from '../server/services/catalog/demo/models';
import { pedalPng } from '../server/services/catalog/demo/photo';
import { appendMovements, type MovementKind } from '../server/services/stock/ledger';

// The catalog of the invented shop: suppliers, ~70 parts with a stock history, one clipping device per
// engine preset, three pedal models with two revisions each and their clipping options.
// Idempotent: parts are matched by part_number, devices by preset_key, models by SKU; existing rows stay.
const DAY = 86_400_000;
const PHOTO_COLOUR: Record<string, string> = { 'HM-SMD': '#3c5249', 'HM-LFO': '#c0602f', 'HM-CPD': '#6b2a33' };
const FAMILY_KIND: Record<string, string> = { silicon: 'silicon', rectifier: 'silicon', schottky: 'schottky', germanium: 'germanium', led: 'led' };

export async function seed(knex: Knex): Promise<void> {
  await knex.transaction(async (trx) => {
    const planner = await trx('users').where({ email: 'planner@shop.example' }).first('id');
    const owner = await trx('users').where({ email: 'owner@shop.example' }).first('id');
    await trx('suppliers').insert(DEMO_SUPPLIERS.map((s) => ({ ...s }))).onConflict('name').ignore();
    const suppliers = new Map((await trx('suppliers').select('id', 'name')).map((s: { id: number; name: string }) => [s.name, s.id]));

    const existingParts = new Set((await trx('parts').select('part_number')).map((r: { part_number: string }) => r.part_number));
    const now = Date.now();
    for (const [i, p] of DEMO_PARTS.entries()) {
      if (existingParts.has(p.part_number)) continue;
      const supplierId = suppliers.get(p.supplier)!;
      const [row] = await trx('parts').insert({
        part_number: p.part_number, category: p.category, value: p.value, package: p.package,
        manufacturer_part_number: p.manufacturer_part_number, supplier_id: supplierId, unit_cost_cents: p.unit_cost_cents,
        lead_time_days: DEMO_SUPPLIERS.find((s) => s.name === p.supplier)!.default_lead_time_days, reorder_point: p.reorder_point,
        bin_location: p.bin_location, notes: '',
      }).returning('id');
      const first = new Date(now - (80 - (i % 7)) * DAY);
      const movements = [
        { kind: 'receive', quantity: p.received[0], on_hand_delta: p.received[0], reserved_delta: 0, user_id: planner?.id, reason: 'Supplier delivery', reference: `DN-${p.supplier.slice(0, 3).toUpperCase()}-${2400 + (i % 5)}`, created_at: first },
      ];
      if (p.received[1]) {
        movements.push({ kind: 'receive', quantity: p.received[1], on_hand_delta: p.received[1], reserved_delta: 0, user_id: planner?.id, reason: 'Supplier delivery', reference: `DN-${p.supplier.slice(0, 3).toUpperCase()}-${2460 + (i % 5)}`, created_at: new Date(now - 30 * DAY) });
      }
      movements.push({ kind: 'consume', quantity: p.consumed, on_hand_delta: -p.consumed, reserved_delta: 0, user_id: planner?.id, reason: 'Kitted for earlier batches', reference: 'Batches before go-live', created_at: new Date(now - 20 * DAY) });
      if (i % 9 === 4) {
        movements.push({ kind: 'adjust', quantity: -2, on_hand_delta: -2, reserved_delta: 0, user_id: owner?.id, reason: 'Stock count: two damaged in the tray', reference: 'Count 2026-11', created_at: new Date(now - 10 * DAY) });
      }
      await appendMovements(trx, movements.map((m) => ({
        partId: row.id, kind: m.kind as MovementKind, quantity: m.quantity, onHandDelta: m.on_hand_delta, reservedDelta: m.reserved_delta,
        userId: m.user_id ?? null, reason: m.reason, reference: m.reference, createdAt: m.created_at,
      })));
    }
    const partIds = new Map((await trx('parts').select('id', 'part_number')).map((r: { id: number; part_number: string }) => [r.part_number, r.id]));

    const existingDevices = new Set((await trx('devices').whereNotNull('preset_key').select('preset_key')).map((r: { preset_key: string }) => r.preset_key));
    for (const preset of DEVICE_PRESETS) {
      if (existingDevices.has(preset.id)) continue;
      const partNumber = PRESET_PARTS[preset.id];
      await trx('devices').insert({
        name: preset.label, kind: FAMILY_KIND[preset.family] ?? 'other', preset_key: preset.id,
        is_amps: preset.model.is, n: preset.model.n, rs_ohms: preset.model.rs,
        eg_ev: preset.model.eg ?? 1.11, xti: preset.model.xti ?? 3, provenance: preset.provenance,
        fit_points: preset.fittedFrom ? JSON.stringify(preset.fittedFrom) : null,
        part_id: partNumber ? partIds.get(partNumber) ?? null : null,
      });
    }
    const devices = new Map((await trx('devices').whereNotNull('preset_key').select('id', 'preset_key')).map((r: { id: number; preset_key: string }) => [r.preset_key, r.id]));

    const existingModels = new Set((await trx('models').select('sku')).map((r: { sku: string }) => r.sku));
    for (const m of DEMO_MODELS) {
      if (existingModels.has(m.sku)) continue;
      const png = pedalPng(PHOTO_COLOUR[m.sku] ?? '#3c5249', 3);
      const [photo] = await trx('files').insert({ purpose: 'model-photo', filename: `${m.sku.toLowerCase()}.png`, content_type: 'image/png', size_bytes: png.length, data: png, uploaded_by: owner?.id ?? null }).returning('id');
      const [model] = await trx('models').insert({ name: m.name, sku: m.sku, description: m.description, base_price_cents: m.base_price_cents, published: m.published, photo_file_id: photo.id }).returning('id');
      let activeId = 0;
      for (const [r, rev] of m.revisions.entries()) {
        const [revision] = await trx('model_revisions').insert({
          model_id: model.id, number: r + 1, label: rev.label, notes: rev.notes, ...rev.drive,
          frozen_at: rev.frozen ? new Date(now - 60 * DAY) : null,
          copied_from_revision_id: r > 0 ? activeId : null,
          created_at: new Date(now - (r === 0 ? 200 : 45) * DAY),
        }).returning('id');
        activeId = revision.id;
        await trx('bom_lines').insert(rev.bom.map((line, position) => bomRow(line, position, revision.id, partIds)));
        await trx('build_steps').insert(rev.steps.map((s, position) => ({
          revision_id: revision.id, position: position + 1, title: s.title, instructions: s.instructions,
          standard_minutes: s.minutes, skill: s.skill, soldering: s.soldering, safety_note: s.safety_note ?? '',
        })));
      }
      await trx('models').where({ id: model.id }).update({ active_revision_id: activeId });
      for (const [position, o] of m.options.entries()) {
        const [option] = await trx('clipping_options').insert({
          model_id: model.id, code: o.code, name: o.name, description: o.description, topology: o.topology,
          network: JSON.stringify(o.network), price_surcharge_cents: o.surcharge, published: o.published, position,
        }).returning('id');
        const rows = [
          ...o.positive.map((key, i) => ({ option_id: option.id, side: 'positive', position: i, device_id: devices.get(key)! })),
          ...o.negative.map((key, i) => ({ option_id: option.id, side: 'negative', position: i, device_id: devices.get(key)! })),
        ];
        await trx('option_devices').insert(rows);
      }
    }
  });
}

function bomRow([partNumber, what, notes]: DemoBomLine, position: number, revisionId: number, partIds: Map<string, number>) {
  const partId = partIds.get(partNumber);
  if (!partId) throw new Error(`demo BOM names an unknown part ${partNumber}`);
  const designators = typeof what === 'string' ? what : '';
  const quantity = typeof what === 'string' ? what.split(' ').length : what;
  const category = DEMO_PARTS.find((p) => p.part_number === partNumber)?.category ?? '';
  return { revision_id: revisionId, part_id: partId, quantity, designators, notes: notes ?? '', position, needs_lot: demoLineNeedsLot(partNumber, category) };
}
