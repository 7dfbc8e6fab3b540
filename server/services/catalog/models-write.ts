// Creating and editing pedal models, their photo, and their clipping options.
import type { Knex } from 'knex';
import type { ModelInput, OptionInput } from '../../../shared/schemas/catalog';
import { PHOTO_TYPES } from '../../../shared/schemas/catalog';
import { invalid, isUniqueViolation, notFound } from '../../errors';
import { imageTypeOf } from '../image-type';

function modelRow(m: Partial<ModelInput>) {
  const r = { name: m.name, sku: m.sku, description: m.description, base_price_cents: m.basePriceCents, published: m.published };
  return Object.fromEntries(Object.entries(r).filter(([, v]) => v !== undefined));
}

function uniqueField(e: unknown, input: { name?: string; sku?: string; code?: string }) {
  const detail = String((e as { constraint?: string }).constraint ?? '');
  if (detail.includes('sku')) return invalid('That SKU is taken', { sku: `${input.sku} already exists` });
  if (detail.includes('code')) return invalid('That code is taken on this model', { code: `${input.code} already exists on this model` });
  return invalid('That name is taken', { name: `${input.name} already exists` });
}

/** POST /api/models: the model and an empty revision 1 (drive stage defaults), made active. */
export async function createModel(knex: Knex, input: ModelInput) {
  try {
    return await knex.transaction(async (trx) => {
      const [m] = await trx('models').insert(modelRow(input)).returning('id');
      const [r] = await trx('model_revisions').insert({ model_id: m.id, number: 1, label: 'First revision', drive_min_gain: 1, drive_max_gain: 100 }).returning('id');
      await trx('models').where({ id: m.id }).update({ active_revision_id: r.id });
      return m.id as number;
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw uniqueField(e, input);
    throw e;
  }
}

export async function updateModel(knex: Knex, id: number, input: Partial<ModelInput>) {
  try {
    const n = await knex('models').where({ id }).update({ ...modelRow(input), updated_at: knex.fn.now() });
    if (n === 0) throw notFound('No such pedal model');
  } catch (e) {
    if (isUniqueViolation(e)) throw uniqueField(e, input);
    throw e;
  }
}

/** PUT /api/models/:id/photo: stores the image in the files table and points the model at it, in one transaction. */
export async function setModelPhoto(knex: Knex, id: number, file: Express.Multer.File | undefined, userId: number) {
  if (!file) throw invalid('Choose a photo', { photo: 'No file was uploaded' });
  // The file's own bytes decide its type, not what the browser claims.
  const type = await imageTypeOf(file.buffer);
  if (!type || !(PHOTO_TYPES as readonly string[]).includes(type)) throw invalid('Photos must be PNG, JPEG or WebP images', { photo: 'Not a PNG, JPEG or WebP image' });
  await knex.transaction(async (trx) => {
    const m = await trx('models').where({ id }).forUpdate().first('photo_file_id');
    if (!m) throw notFound('No such pedal model');
    const [f] = await trx('files').insert({ purpose: 'model-photo', filename: file.originalname.slice(0, 200) || 'photo', content_type: type, size_bytes: file.size, data: file.buffer, uploaded_by: userId }).returning('id');
    await trx('models').where({ id }).update({ photo_file_id: f.id, updated_at: trx.fn.now() });
    if (m.photo_file_id) await trx('files').where({ id: m.photo_file_id }).delete();
  });
}

async function writeStrings(trx: Knex.Transaction, optionId: number, input: Pick<OptionInput, 'positive' | 'negative'>) {
  const ids = [...new Set([...input.positive, ...input.negative])];
  const found = await trx('devices').whereIn('id', ids).pluck('id');
  const bad = ids.find((i) => !found.includes(i));
  if (bad) throw invalid('Choose devices from the library', { [input.positive.includes(bad) ? 'positive' : 'negative']: `No device with id ${bad}` });
  await trx('option_devices').where({ option_id: optionId }).delete();
  const rows = [
    ...input.positive.map((device_id, position) => ({ option_id: optionId, side: 'positive', position, device_id })),
    ...input.negative.map((device_id, position) => ({ option_id: optionId, side: 'negative', position, device_id })),
  ];
  if (rows.length) await trx('option_devices').insert(rows);
}

function optionRow(o: Partial<OptionInput>) {
  const r = {
    code: o.code, name: o.name, description: o.description, topology: o.topology,
    network: o.network ? JSON.stringify(o.network) : undefined, price_surcharge_cents: o.surchargeCents, published: o.published,
  };
  return Object.fromEntries(Object.entries(r).filter(([, v]) => v !== undefined));
}

function checkNetwork(o: Partial<OptionInput>) {
  if (o.topology === 'shunt' && !o.network?.seriesOhms) throw invalid('A shunt clipper needs its series resistor', { 'network.seriesOhms': 'Enter the series resistor' });
  if (o.topology === 'feedback' && (!o.network?.feedbackOhms || !o.network?.groundOhms)) {
    throw invalid('A feedback clipper needs both resistors', { [!o.network?.feedbackOhms ? 'network.feedbackOhms' : 'network.groundOhms']: 'Enter the resistor' });
  }
}

export async function createOption(knex: Knex, modelId: number, input: OptionInput) {
  checkNetwork(input);
  try {
    return await knex.transaction(async (trx) => {
      if (!(await trx('models').where({ id: modelId }).first('id'))) throw notFound('No such pedal model');
      const [{ max }] = await trx('clipping_options').where({ model_id: modelId }).max<{ max: number | null }[]>('position as max');
      const [o] = await trx('clipping_options').insert({ ...optionRow(input), model_id: modelId, position: (max ?? -1) + 1 }).returning('id');
      await writeStrings(trx, o.id, input);
      return o.id as number;
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw uniqueField(e, input);
    throw e;
  }
}

export async function updateOption(knex: Knex, optionId: number, input: Partial<OptionInput>) {
  try {
    return await knex.transaction(async (trx) => {
      const current = await trx('clipping_options').where({ id: optionId }).forUpdate().first();
      if (!current) throw notFound('No such clipping option');
      const merged = { topology: input.topology ?? current.topology, network: input.network ?? current.network };
      checkNetwork(merged);
      await trx('clipping_options').where({ id: optionId }).update(optionRow(input));
      if (input.positive || input.negative) {
        const sides = await trx('option_devices').where({ option_id: optionId }).orderBy('position').select('side', 'device_id');
        await writeStrings(trx, optionId, {
          positive: input.positive ?? sides.filter((s) => s.side === 'positive').map((s) => s.device_id),
          negative: input.negative ?? sides.filter((s) => s.side === 'negative').map((s) => s.device_id),
        });
      }
      return current.model_id as number;
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw uniqueField(e, input);
    throw e;
  }
}
