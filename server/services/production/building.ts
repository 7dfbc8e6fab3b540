import type { Knex } from 'knex';
import type { SessionUser } from '../../../shared/roles';
import type { BuildListQuery, DeviceReadingsInput, FinishStepInput, PartLotsInput, ReopenStepInput } from '../../../shared/schemas/production';
import { isFastStep, lateReason, shopDate } from '../../../shared/production/bench-rules';
import { isVfOutOfRange, vfRange } from '../../../shared/production/forward-voltage';
import { PHOTO_TYPES } from '../../../shared/schemas/catalog';
import { conflict, DomainError, forbidden, invalid, notFound } from '../../errors';
import { containsPattern, paged } from '../../http/paged';
import { imageTypeOf } from '../image-type';
import { transitionOrder } from '../orders/transitions';
import { getSettings, type ShopSettings } from '../settings';
import { lockUnit, lockUnitWithBatch, transitionUnit, unitEvent } from './history';
import { toDate } from './planning';
import { slotLabelsFor } from './matching';
import { nominalVf, predictUnit } from './unit-circuit';
import { inConstants } from '../../db/prepared';
import { lookupJoin } from '../../db/lookup-join';

type Db = Knex | Knex.Transaction;

/** An assembler may see and change only the units assigned to them; other staff see every unit. */
export function assertMayView(user: SessionUser, unit: { assembler_id: number | null }) {
  if (user.role === 'assembler' && unit.assembler_id !== user.id) throw forbidden('This build is assigned to someone else');
}

function assertBuilder(user: SessionUser, unit: { assembler_id: number | null; serial: string }) {
  if (unit.assembler_id !== user.id) throw forbidden(`Unit ${unit.serial} is not assigned to you`);
}

/** Why an open build is late today (its planned day or its order's due date has passed), or null. */
function buildLateReason(row: { planned_date: Date | string | null; due_at: Date | string | null }, settings: ShopSettings, today: string) {
  return lateReason({ plannedDate: row.planned_date ? toDate(row.planned_date) : null, dueDate: row.due_at ? shopDate(row.due_at, settings.time_zone) : null }, today);
}

/** The assembler's queue, in build order, a page at a time, with late builds flagged. */
const BUILD_SORT: Record<BuildListQuery['sort'], string> = { queue: 'queue_rank', plannedDate: 'u.planned_date', serial: 'u.serial', modelName: 'm.name' };

export async function myBuilds(db: Db, userId: number, params: BuildListQuery) {
  const settings = await getSettings(db);
  const today = shopDate(new Date(), settings.time_zone);
  // Every unit has its batch, revision, model and option (foreign keys, not null): the count joins
  // them only to search their names.
  const base = (joined = true) => {
    const q = db('units as u').where('u.assembler_id', userId).where(inConstants(db, 'u.state', ['waiting', 'building', 'rework']));
    if (!joined) return q;
    q.joinRaw(lookupJoin(db, 'batches', 'b', ['revision_id'], 'u.batch_id')).join('model_revisions as r', 'r.id', 'b.revision_id')
      .join('models as m', 'm.id', 'r.model_id').join('clipping_options as c', 'c.id', 'u.option_id');
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('u.serial', like).orWhereILike('m.name', like).orWhereILike('c.name', like)); }
    return q;
  };
  return paged(params, {
    count: base(Boolean(params.q)),
    rows: base().joinRaw(lookupJoin(db, 'orders', 'o', ['due_at'], 'u.order_id'))
      .select('u.id', 'u.serial', 'u.state', 'u.planned_date', 'u.kitted_at', 'm.name as model_name', 'c.name as option_name', 'o.due_at',
        db.raw('(SELECT COUNT(*)::int FROM build_steps s WHERE s.revision_id = b.revision_id) AS steps'),
        db.raw('(SELECT COUNT(*)::int FROM unit_steps us WHERE us.unit_id = u.id AND us.finished_at IS NOT NULL) AS steps_done'),
        // Build order over the whole queue (rework, then on the bench, then by planned day), so pages follow it.
        db.raw("row_number() OVER (ORDER BY CASE u.state WHEN 'rework' THEN 0 WHEN 'building' THEN 1 ELSE 2 END, u.planned_date, u.queue_position, u.id) AS queue_rank")),
    sortColumns: BUILD_SORT, tieBreak: 'u.id',
    map: (r: BuildRowDb) => ({
      queueRank: Number(r.queue_rank), id: r.id, serial: r.serial, state: r.state, plannedDate: r.planned_date ? toDate(r.planned_date) : null, kitted: r.kitted_at !== null,
      modelName: r.model_name, optionName: r.option_name, steps: r.steps, stepsDone: r.steps_done, late: buildLateReason(r, settings, today),
    }),
  });
}

/** The unit behind a typed or scanned serial (any letter case); an assembler finds only their own builds. */
export async function unitBySerial(db: Db, user: SessionUser, serial: string) {
  const unit = await db('units').whereRaw('upper(serial) = upper(?)', [serial]).first('id', 'serial', 'state', 'assembler_id');
  if (!unit) throw notFound(`No unit has the serial ${serial.toUpperCase()}`);
  assertMayView(user, unit);
  return { id: unit.id as number, serial: unit.serial as string, state: unit.state as string };
}

interface BuildRowDb { queue_rank: string; id: number; serial: string; state: string; planned_date: Date | null; kitted_at: Date | null; model_name: string; option_name: string; steps: number; steps_done: number; due_at: Date | null }

/** Everything the unit page shows: checklist, devices to match, lots, photos, tests and history. */
export async function getUnit(db: Db, user: SessionUser, unitId: number) {
  const unit = await db('units').where({ id: unitId }).first();
  if (!unit) throw notFound('No such unit');
  assertMayView(user, unit);
  const batch = await db('batches').where({ id: unit.batch_id }).first();
  const [revision, option, settings] = await Promise.all([
    db('model_revisions as r').join('models as m', 'm.id', 'r.model_id').where('r.id', batch.revision_id).select('r.*', 'm.name as model_name').first(),
    db('clipping_options').where({ id: unit.option_id }).first(),
    getSettings(db),
  ]);
  const steps = await db('build_steps as s').leftJoin('unit_steps as us', function join() { this.on('us.step_id', 's.id').andOnVal('us.unit_id', unitId); })
    .where('s.revision_id', batch.revision_id).orderBy('s.position')
    .select('s.id', 's.position', 's.title', 's.instructions', 's.standard_minutes', 's.skill', 's.safety_note', 's.soldering', 'us.started_at', 'us.finished_at', 'us.actual_minutes');
  const devices = await db('option_devices as od').join('devices as d', 'd.id', 'od.device_id')
    .leftJoin('unit_devices as ud', function join() { this.on('ud.option_device_id', 'od.id').andOnVal('ud.unit_id', unitId); })
    .where('od.option_id', unit.option_id).orderBy(['od.side', 'od.position'])
    .select('od.id', 'od.side', 'od.position', 'd.name', 'd.kind', 'd.is_amps', 'd.n', 'd.rs_ohms', 'ud.measured_vf', 'ud.out_of_range');
  const lots = await db('bom_lines as bl').join('parts as p', 'p.id', 'bl.part_id')
    .leftJoin('unit_part_lots as l', function join() { this.on('l.bom_line_id', 'bl.id').andOnVal('l.unit_id', unitId); })
    .where({ 'bl.revision_id': batch.revision_id, 'bl.needs_lot': true }).orderBy('bl.position')
    .select('bl.id', 'bl.designators', 'p.part_number', 'p.value', 'l.lot');
  const photos = await db('unit_photos').where({ unit_id: unitId }).select('id', 'file_id', 'caption', 'created_at').orderBy('id');
  const tests = await db('test_records as t').leftJoin('users as u', 'u.id', 't.tester_id').where('t.unit_id', unitId).orderBy('t.id', 'desc')
    .select('t.*', 'u.name as tester_name');
  const history = await db('unit_events as e').leftJoin('users as u', 'u.id', 'e.user_id').where('e.unit_id', unitId).orderBy('e.id')
    .select('e.id', 'e.kind', 'e.from_state', 'e.to_state', 'e.message', 'e.created_at', 'u.name as user_name');
  const assembler = unit.assembler_id ? await db('users').where({ id: unit.assembler_id }).first('name') : null;
  const fromTrays = (await slotLabelsFor(db, [unitId])).get(unitId);
  const order = unit.order_id ? await db('orders').where({ id: unit.order_id }).first('due_at') : null;
  const open = ['waiting', 'building', 'rework'].includes(unit.state);
  return {
    unit: {
      id: unit.id, serial: unit.serial, state: unit.state, kitted: unit.kitted_at !== null, plannedDate: unit.planned_date ? toDate(unit.planned_date) : null,
      assemblerId: unit.assembler_id, assemblerName: assembler?.name ?? null, orderId: unit.order_id, predicted: unit.predicted,
      modelName: revision.model_name, revisionNumber: revision.number, optionName: option.name, optionCode: option.code, batchId: batch.id, batchNumber: batch.number,
      referenceDrive: revision.reference_drive, supplyV: revision.supply_v,
      late: open ? buildLateReason({ planned_date: unit.planned_date, due_at: order?.due_at ?? null }, settings, shopDate(new Date(), settings.time_zone)) : null,
    },
    testCurrentMa: settings.vf_test_current_ma,
    fastStepPercent: settings.fast_step_percent,
    thdTolerancePercent: settings.thd_tolerance_percent,
    harmonicToleranceDb: settings.harmonic_tolerance_db,
    steps: steps.map((s) => ({
      id: s.id, position: s.position, title: s.title, instructions: s.instructions, standardMinutes: s.standard_minutes, skill: s.skill,
      safetyNote: s.safety_note, soldering: s.soldering, startedAt: s.started_at, finishedAt: s.finished_at, actualMinutes: s.actual_minutes,
    })),
    devices: devices.map((d) => ({
      optionDeviceId: d.id, side: d.side, position: d.position, name: d.name, kind: d.kind, range: vfRange(d.kind),
      nominalVf: nominalVf({ is: d.is_amps, n: d.n, rs: d.rs_ohms }, settings.vf_test_current_ma), measuredVf: d.measured_vf, outOfRange: d.out_of_range,
      // The tray slot matched into this position (kit list and checklist name it), with the Vf it was measured at.
      slot: fromTrays?.get(d.id) ?? null,
    })),
    lots: lots.map((l) => ({ bomLineId: l.id, designators: l.designators, partNumber: l.part_number, value: l.value, lot: l.lot })),
    photos: photos.map((p) => ({ id: p.id, url: `/api/units/${unitId}/photos/${p.id}`, caption: p.caption, createdAt: p.created_at })),
    tests: tests.map((t) => ({
      id: t.id, testerName: t.tester_name, currentDrawMa: t.current_draw_ma, measuredThdPercent: t.measured_thd_percent, predictedThdPercent: t.predicted_thd_percent,
      tolerancePercent: t.tolerance_percent, harmonicToleranceDb: t.harmonic_tolerance_db, withinTolerance: t.within_tolerance, outcome: t.outcome, reason: t.reason,
      capture: t.wav_analysis, measuredHarmonics: t.measured_harmonics, measuredThdRPercent: t.measured_thd_r_percent, createdAt: t.created_at,
    })),
    history: history.map((h) => ({ id: h.id, kind: h.kind, from: h.from_state, to: h.to_state, message: h.message, at: h.created_at, by: h.user_name })),
  };
}

async function ownedUnitForWork(trx: Knex.Transaction, user: SessionUser, unitId: number) {
  const unit = await lockUnit(trx, unitId);
  assertBuilder(user, unit);
  if (!['waiting', 'building', 'rework'].includes(unit.state)) throw conflict(`Unit ${unit.serial} is not open for building`);
  if (!unit.kitted_at) throw conflict(`Unit ${unit.serial} has not been kitted yet: ask the planner to kit it`);
  return unit;
}

/** Starts a checklist step; the first start puts the unit (and its batch and order) on the bench. */
export async function startStep(knex: Knex, user: SessionUser, unitId: number, stepId: number) {
  return knex.transaction(async (trx) => {
    // The ledger's lock order: the batch (it may go on the bench), then the unit.
    const { batch } = await lockUnitWithBatch(trx, unitId);
    const unit = await ownedUnitForWork(trx, user, unitId);
    const step = await trx('build_steps').where({ id: stepId, revision_id: batch.revision_id }).first();
    if (!step) throw notFound('No such step on this build');
    const existing = await trx('unit_steps').where({ unit_id: unitId, step_id: stepId }).first();
    if (existing && unit.state !== 'rework') throw conflict(`“${step.title}” was already started`);
    if (existing) await trx('unit_steps').where({ id: existing.id }).update({ started_at: trx.fn.now(), finished_at: null, actual_minutes: null, user_id: user.id });
    else await trx('unit_steps').insert({ unit_id: unitId, step_id: stepId, user_id: user.id, started_at: trx.fn.now() });
    if (unit.state === 'waiting') {
      await transitionUnit(trx, unit, 'building', user.id, `started “${step.title}”`);
      if (batch.state === 'released') await trx('batches').where({ id: batch.id }).update({ state: 'on_bench', updated_at: trx.fn.now() });
      if (unit.order_id) {
        const order = await trx('orders').where({ id: unit.order_id }).first();
        if (order.state === 'scheduled') await transitionOrder(trx, unit.order_id, 'in_production', { userId: user.id, message: `building started on ${unit.serial}` });
      }
    } else await unitEvent(trx, unitId, 'step', `started “${step.title}”`, user.id);
    return { unitId, stepId, started: true };
  });
}

/**
 * Finishes a started step and keeps its actual minutes beside the standard. A finish in under the
 * shop's `fast_step_percent` of the standard minutes is refused (409, code `fast_step`) until the
 * assembler confirms it; the confirmation goes into the history.
 */
export async function finishStep(knex: Knex, user: SessionUser, unitId: number, stepId: number, input: FinishStepInput = { confirmFast: false }) {
  return knex.transaction(async (trx) => {
    await ownedUnitForWork(trx, user, unitId);
    const progress = await trx('unit_steps').where({ unit_id: unitId, step_id: stepId })
      .select('*', trx.raw('ROUND((EXTRACT(EPOCH FROM (now() - started_at)) / 60.0)::numeric, 1)::float AS elapsed')).forUpdate().first();
    if (!progress) throw conflict('Start this step before finishing it');
    if (progress.finished_at) throw conflict('This step is already finished');
    const step = await trx('build_steps').where({ id: stepId }).first();
    const percent = (await getSettings(trx)).fast_step_percent;
    const fast = isFastStep(progress.elapsed, step.standard_minutes, percent);
    if (fast && !input.confirmFast) {
      throw new DomainError(409, 'fast_step', `“${step.title}” took ${progress.elapsed < 1 ? 'under a minute' : `${progress.elapsed} min`}, under ${percent} % of its standard ${step.standard_minutes} min: confirm it is really finished`);
    }
    const [row] = await trx('unit_steps').where({ id: progress.id }).update({ finished_at: trx.fn.now(), actual_minutes: progress.elapsed }).returning('actual_minutes');
    const confirmed = fast ? '; confirmed as finished although far under the standard time' : '';
    await unitEvent(trx, unitId, 'step', `finished “${step.title}” in ${row.actual_minutes} min (standard ${step.standard_minutes} min)${confirmed}`, user.id);
    return { unitId, stepId, actualMinutes: Number(row.actual_minutes), standardMinutes: step.standard_minutes, confirmedFast: fast };
  });
}

/** Reopens a finished step (a mis-tap, or work to redo): it is in progress again from now, and the reason is kept in the history. */
export async function reopenStep(knex: Knex, user: SessionUser, unitId: number, stepId: number, input: ReopenStepInput) {
  return knex.transaction(async (trx) => {
    await ownedUnitForWork(trx, user, unitId);
    const progress = await trx('unit_steps').where({ unit_id: unitId, step_id: stepId }).forUpdate().first();
    if (!progress?.finished_at) throw conflict('Only a finished step can be reopened');
    const step = await trx('build_steps').where({ id: stepId }).first();
    await trx('unit_steps').where({ id: progress.id }).update({ started_at: trx.fn.now(), finished_at: null, actual_minutes: null, user_id: user.id });
    await unitEvent(trx, unitId, 'step', `reopened “${step.title}”: ${input.reason}`, user.id);
    return { unitId, stepId, reopened: true };
  });
}

/** Records measured Vf of the fitted clipping devices and recomputes the unit's predicted profile. */
export async function recordReadings(knex: Knex, user: SessionUser, unitId: number, input: DeviceReadingsInput) {
  return knex.transaction(async (trx) => {
    const unit = await ownedUnitForWork(trx, user, unitId);
    const batch = await trx('batches').where({ id: unit.batch_id }).first();
    const settings = await getSettings(trx);
    const devices = await trx('option_devices as od').join('devices as d', 'd.id', 'od.device_id').where('od.option_id', unit.option_id).select('od.id', 'd.kind', 'd.name');
    const byId = new Map(devices.map((d) => [d.id, d]));
    const fields: Record<string, string> = {};
    const flagged: number[] = [];
    input.readings.forEach((r, i) => {
      const d = byId.get(r.optionDeviceId);
      if (!d) { fields[`readings.${i}.optionDeviceId`] = 'Not a device of this build'; return; }
      if (isVfOutOfRange(d.kind, r.vf)) {
        flagged.push(r.optionDeviceId);
        const range = vfRange(d.kind);
        if (!input.acceptOutOfRange) fields[`readings.${i}.vf`] = `${r.vf.toFixed(3)} V is outside ${range.min.toFixed(2)}–${range.max.toFixed(2)} V for ${d.kind}: measure again, or keep it anyway`;
      }
    });
    if (Object.keys(fields).length) throw invalid('Check the flagged readings', fields);
    for (const r of input.readings) {
      await trx('unit_devices').insert({ unit_id: unitId, option_device_id: r.optionDeviceId, measured_vf: r.vf, test_current_ma: settings.vf_test_current_ma, out_of_range: flagged.includes(r.optionDeviceId), user_id: user.id })
        .onConflict(['unit_id', 'option_device_id']).merge();
    }
    const measured = new Map<number, number>((await trx('unit_devices').where({ unit_id: unitId }).select('option_device_id', 'measured_vf')).map((m) => [m.option_device_id, m.measured_vf]));
    const predicted = await predictUnit(trx, batch.revision_id, unit.option_id, measured, settings.vf_test_current_ma);
    await trx('units').where({ id: unitId }).update({ predicted: JSON.stringify(predicted), updated_at: trx.fn.now() });
    await unitEvent(trx, unitId, 'devices', `${input.readings.length} Vf reading(s) at ${settings.vf_test_current_ma} mA${flagged.length ? `, ${flagged.length} kept out of range` : ''}; predicted THD ${predicted.thdPercent.toFixed(2)} %`, user.id);
    return { predicted, flagged };
  });
}

export async function recordLots(knex: Knex, user: SessionUser, unitId: number, input: PartLotsInput) {
  return knex.transaction(async (trx) => {
    const unit = await ownedUnitForWork(trx, user, unitId);
    const batch = await trx('batches').where({ id: unit.batch_id }).first();
    const allowed = new Set<number>(await trx('bom_lines').where({ revision_id: batch.revision_id, needs_lot: true }).pluck('id'));
    const fields: Record<string, string> = {};
    input.lots.forEach((l, i) => { if (!allowed.has(l.bomLineId)) fields[`lots.${i}.bomLineId`] = 'This BOM line does not ask for a lot'; });
    if (Object.keys(fields).length) throw invalid('Some lots are for lines that do not ask for one', fields);
    for (const l of input.lots) await trx('unit_part_lots').insert({ unit_id: unitId, bom_line_id: l.bomLineId, lot: l.lot }).onConflict(['unit_id', 'bom_line_id']).merge();
    await unitEvent(trx, unitId, 'lots', `${input.lots.length} part lot(s) recorded`, user.id);
    return { saved: input.lots.length };
  });
}

export async function addPhoto(knex: Knex, user: SessionUser, unitId: number, file: { originalname: string; mimetype: string; size: number; buffer: Buffer } | undefined, caption: string) {
  if (!file) throw invalid('Choose a photo to upload', { photo: 'Choose a photo' });
  // The declared type is the browser's guess; the file's own bytes decide.
  const sniffed = await imageTypeOf(file.buffer);
  if (!(PHOTO_TYPES as readonly string[]).includes(file.mimetype) || !sniffed) throw invalid('Photos must be JPEG, PNG or WebP', { photo: 'JPEG, PNG or WebP only' });
  file = { ...file, mimetype: sniffed };
  return knex.transaction(async (trx) => {
    const unit = await lockUnit(trx, unitId);
    assertBuilder(user, unit);
    const [f] = await trx('files').insert({ purpose: 'unit-photo', filename: file.originalname.slice(0, 200), content_type: file.mimetype, size_bytes: file.size, data: file.buffer, uploaded_by: user.id }).returning('id');
    const [p] = await trx('unit_photos').insert({ unit_id: unitId, file_id: f.id, caption: caption.slice(0, 200) }).returning('id');
    await unitEvent(trx, unitId, 'photo', 'photo added', user.id);
    return { id: p.id as number };
  });
}

export async function getPhoto(db: Db, user: SessionUser, unitId: number, photoId: number) {
  const unit = await db('units').where({ id: unitId }).first();
  if (!unit) throw notFound('No such unit');
  assertMayView(user, unit);
  const row = await db('unit_photos as p').join('files as f', 'f.id', 'p.file_id').where({ 'p.id': photoId, 'p.unit_id': unitId }).select('f.content_type', 'f.data').first();
  if (!row) throw notFound('No such photo');
  return row as { content_type: string; data: Buffer };
}

/** Marks a build done: every step finished, every clipping device measured, every asked-for lot entered. */
export async function markBuilt(knex: Knex, user: SessionUser, unitId: number) {
  return knex.transaction(async (trx) => {
    const unit = await ownedUnitForWork(trx, user, unitId);
    const batch = await trx('batches').where({ id: unit.batch_id }).first();
    const missing: string[] = [];
    if (unit.state === 'building') {
      const open = await trx('build_steps as s').leftJoin('unit_steps as us', function join() { this.on('us.step_id', 's.id').andOnVal('us.unit_id', unitId); })
        .where('s.revision_id', batch.revision_id).whereNull('us.finished_at').pluck('s.title');
      if (open.length) missing.push(`steps not finished: ${open.join(', ')}`);
    }
    const unmeasured = await trx('option_devices as od').leftJoin('unit_devices as ud', function join() { this.on('ud.option_device_id', 'od.id').andOnVal('ud.unit_id', unitId); })
      .where('od.option_id', unit.option_id).whereNull('ud.id').count({ n: '*' }).first();
    if (Number(unmeasured?.n) > 0) missing.push(`${unmeasured?.n} clipping device(s) without a measured Vf`);
    const lotless = await trx('bom_lines as bl').leftJoin('unit_part_lots as l', function join() { this.on('l.bom_line_id', 'bl.id').andOnVal('l.unit_id', unitId); })
      .where({ 'bl.revision_id': batch.revision_id, 'bl.needs_lot': true }).whereNull('l.id').count({ n: '*' }).first();
    if (Number(lotless?.n) > 0) missing.push(`${lotless?.n} part lot(s) not entered`);
    if (missing.length) throw conflict(`Unit ${unit.serial} is not finished: ${missing.join('; ')}`);
    await transitionUnit(trx, unit, 'built', user.id, unit.state === 'rework' ? 'rework done' : 'build finished');
    return { id: unitId, state: unit.state };
  });
}
