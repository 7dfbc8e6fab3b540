// One unit's sheet: who may read it, when it is stored, and the explicit, logged regeneration.
import type { Knex } from 'knex';
import { STAFF, type SessionUser } from '../../../shared/roles';
import { conflict, notFound } from '../../errors';
import { compute } from '../../compute/pool';
import { unitEvent } from '../production/history';
import { defaultPublicUrl, sheetDataForUnit, SHEET_STATES, unitBySerial } from './assemble';

type Db = Knex | Knex.Transaction;

const isStaff = (user: SessionUser) => STAFF.includes(user.role);

export const sheetFilename = (serial: string) => `spec-sheet-${serial}.pdf`;

/** A unit's sheet once it has passed is stored and served from then on. */
export const storesSheet = (state: string) => (SHEET_STATES as readonly string[]).includes(state);

export async function renderUnitSheet(db: Db, unitId: number, publicUrl = defaultPublicUrl()) {
  return compute.specSheetPdf(await sheetDataForUnit(db, unitId, publicUrl));
}

async function insertSheetFile(trx: Db, serial: string, pdf: Buffer, userId: number | null) {
  const [file] = await trx('files').insert({
    purpose: 'spec-sheet', filename: sheetFilename(serial), content_type: 'application/pdf', size_bytes: pdf.length, data: pdf, uploaded_by: userId,
  }).returning('id');
  return file.id as number;
}

/**
 * Renders and stores the sheet of a unit that has just passed, inside the caller's transaction;
 * returns the file id for the "built and passed" mail. A unit that already has one keeps it.
 */
export async function storeSheetForPassedUnit(trx: Knex.Transaction, unitId: number, userId: number | null = null, publicUrl = defaultPublicUrl()): Promise<number> {
  // The unit's row lock makes a second caller (the batch job, a download) wait and then find the stored sheet.
  const unit = await trx('units').where({ id: unitId }).forUpdate().first('serial');
  if (!unit) throw notFound('No such unit');
  const existing = await trx('spec_sheets').where({ unit_id: unitId }).first('file_id');
  if (existing) return existing.file_id as number;
  const fileId = await insertSheetFile(trx, unit.serial, await renderUnitSheet(trx, unitId, publicUrl), userId);
  await trx('spec_sheets').insert({ unit_id: unitId, file_id: fileId, version: 1, generated_by: userId });
  return fileId;
}

/** Staff see every unit; a customer only their own order's units, and anyone else's is "not found". */
async function readableUnit(db: Db, user: SessionUser, serial: string) {
  const unit = await unitBySerial(db, serial);
  if (!isStaff(user) && unit.customer_id !== user.id) throw notFound(`No unit with serial ${serial}`);
  return unit;
}

/** The sheet's bytes: the stored one once the unit has passed, otherwise rendered on demand and not kept. */
export async function unitSheetPdf(knex: Knex, user: SessionUser, serial: string, publicUrl?: string) {
  const unit = await readableUnit(knex, user, serial);
  if (!isStaff(user) && !storesSheet(unit.state)) throw conflict(`The spec sheet of ${serial} is ready once the unit has passed its bench test`);
  const stored = await knex('spec_sheets as s').join('files as f', 'f.id', 's.file_id').where('s.unit_id', unit.id).first('f.data');
  if (stored) return { filename: sheetFilename(serial), pdf: stored.data as Buffer, stored: true };
  if (storesSheet(unit.state)) {
    // Passed before sheets were stored (or the store failed): keep it now, so it stays fixed.
    const fileId = await knex.transaction((trx) => storeSheetForPassedUnit(trx, unit.id, null, publicUrl));
    const file = await knex('files').where({ id: fileId }).first('data');
    return { filename: sheetFilename(serial), pdf: file.data as Buffer, stored: true };
  }
  return { filename: sheetFilename(serial), pdf: await renderUnitSheet(knex, unit.id, publicUrl), stored: false };
}

/**
 * Renders a passed unit's sheet again from today's data (e.g. after a device preset was corrected)
 * and logs it in the unit's history; the old file stays for the record.
 */
export async function regenerateSheet(knex: Knex, user: SessionUser, serial: string, publicUrl?: string) {
  return knex.transaction(async (trx) => {
    const unit = await unitBySerial(trx, serial);
    await trx('units').where({ id: unit.id }).forUpdate().first('id');
    if (!storesSheet(unit.state)) throw conflict(`Unit ${serial} has not passed its bench test: its sheet is made on demand and not stored yet`);
    const fileId = await insertSheetFile(trx, serial, await renderUnitSheet(trx, unit.id, publicUrl), user.id);
    const previous = await trx('spec_sheets').where({ unit_id: unit.id }).first('version');
    const version = (previous?.version ?? 0) + 1;
    await trx('spec_sheets').insert({ unit_id: unit.id, file_id: fileId, version, generated_by: user.id, generated_at: trx.fn.now() })
      .onConflict('unit_id').merge(['file_id', 'version', 'generated_by', 'generated_at']);
    await unitEvent(trx, unit.id, 'spec-sheet', `spec sheet regenerated (version ${version})`, user.id);
    return { serial, version, fileId };
  });
}

/** An order's units with whether each sheet can be downloaded yet; a customer sees only their own orders. */
export async function orderSheets(knex: Knex, user: SessionUser, orderId: number) {
  const order = await knex('orders').where({ id: orderId }).first('id', 'customer_id');
  if (!order || (!isStaff(user) && order.customer_id !== user.id)) throw notFound('No such order');
  const units = await knex('units as u').join('clipping_options as c', 'c.id', 'u.option_id').join('models as m', 'm.id', 'c.model_id')
    .where('u.order_id', orderId).whereNot('u.state', 'cancelled').orderBy('u.serial').select('u.serial', 'u.state', 'm.name as model_name', 'c.name as option_name');
  return units.map((u) => ({ serial: u.serial as string, state: u.state as string, modelName: u.model_name as string, optionName: u.option_name as string, sheetReady: storesSheet(u.state) }));
}
