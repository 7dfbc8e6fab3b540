// BOM lines of a revision, edited one at a time or replaced from a CSV file.
// CSV format (documented in DEVELOPERS.md): a header row; column names are case-insensitive:
//   part number (or part_number, part), quantity (or qty), designators (or reference designators, refdes), notes (optional).
// Designators are separated by spaces, commas or semicolons; when given, their count must equal the quantity.
// Preview reports every row's problems and writes nothing; import re-checks and replaces the BOM in one transaction.
import type { Knex } from 'knex';
import { parse } from 'csv-parse/sync';
import type { BomLineInput } from '../../../shared/schemas/catalog';
import { invalid, notFound } from '../../errors';
import { getRevision, lockEditable } from './revisions';

const HEADERS: Record<string, 'partNumber' | 'quantity' | 'designators' | 'notes'> = {
  'part number': 'partNumber', part_number: 'partNumber', partnumber: 'partNumber', part: 'partNumber',
  quantity: 'quantity', qty: 'quantity',
  designators: 'designators', 'reference designators': 'designators', refdes: 'designators', designator: 'designators',
  notes: 'notes', note: 'notes',
};

export const splitDesignators = (s: string) => s.split(/[\s,;]+/).map((d) => d.trim().toUpperCase()).filter(Boolean);

export interface CsvRowResult {
  row: number; // line number in the file (the header is line 1)
  partNumber: string;
  partId: number | null;
  quantity: number | null;
  designators: string[];
  notes: string;
  problems: string[];
}

/** Reads and checks a BOM CSV against the parts table; never writes. */
export async function checkBomCsv(db: Knex | Knex.Transaction, file: Buffer | undefined) {
  if (!file || file.length === 0) throw invalid('Choose a CSV file', { file: 'No file was uploaded' });
  let records: string[][];
  try {
    records = parse(file.toString('utf8').replace(/^\uFEFF/, ''), { skip_empty_lines: true, relax_column_count: true, trim: true });
  } catch (e) {
    throw invalid('The file is not readable CSV', { file: (e as Error).message.slice(0, 200) });
  }
  if (records.length < 2) throw invalid('The file has no BOM rows', { file: 'Expected a header row and at least one line' });
  const index: Partial<Record<'partNumber' | 'quantity' | 'designators' | 'notes', number>> = {};
  records[0].forEach((h, i) => { const key = HEADERS[h.trim().toLowerCase().replace(/\s+/g, ' ')]; if (key && index[key] === undefined) index[key] = i; });
  const missing = (['partNumber', 'quantity', 'designators'] as const).filter((k) => index[k] === undefined);
  if (missing.length) {
    const names = { partNumber: 'part number', quantity: 'quantity', designators: 'designators' };
    throw invalid('The header row is missing columns', { file: `Missing column${missing.length > 1 ? 's' : ''}: ${missing.map((m) => `"${names[m]}"`).join(', ')}` });
  }
  if (records.length > 2001) throw invalid('Too many rows', { file: 'At most 2000 BOM rows per file' });
  const numbers = [...new Set(records.slice(1).map((r) => (r[index.partNumber!] ?? '').trim()).filter(Boolean))];
  const parts = new Map<string, number>();
  for (const p of numbers.length ? await db('parts').whereRaw('upper(part_number) = ANY(?)', [numbers.map((n) => n.toUpperCase())]).select('id', 'part_number') : []) {
    parts.set(String(p.part_number).toUpperCase(), p.id);
  }
  const seen = new Map<string, number>();
  const rows: CsvRowResult[] = records.slice(1).map((r, i) => {
    const row = i + 2;
    const partNumber = (r[index.partNumber!] ?? '').trim();
    const qtyText = (r[index.quantity!] ?? '').trim();
    const designators = splitDesignators(r[index.designators!] ?? '');
    const problems: string[] = [];
    const partId = partNumber ? parts.get(partNumber.toUpperCase()) ?? null : null;
    if (!partNumber) problems.push('Part number is missing');
    else if (!partId) problems.push(`Unknown part number "${partNumber}"`);
    const quantity = /^\d+$/.test(qtyText) && Number(qtyText) >= 1 && Number(qtyText) <= 10000 ? Number(qtyText) : null;
    if (quantity === null) problems.push(`Bad quantity "${qtyText}": use a whole number from 1 to 10000`);
    for (const d of designators) {
      if (seen.has(d)) problems.push(`Duplicate designator ${d} (also on row ${seen.get(d)})`);
      else seen.set(d, row);
    }
    if (quantity !== null && designators.length > 0 && designators.length !== quantity) {
      problems.push(`${designators.length} designator${designators.length === 1 ? '' : 's'} for quantity ${quantity}`);
    }
    return { row, partNumber, partId, quantity, designators, notes: index.notes !== undefined ? (r[index.notes] ?? '').trim().slice(0, 500) : '', problems };
  });
  const bad = rows.filter((r) => r.problems.length > 0).length;
  return { rows, total: rows.length, bad, ok: bad === 0 };
}

/** POST …/bom-csv/import: all rows good → the revision's BOM is replaced, else 400 with the row problems and nothing written. */
export async function importBomCsv(knex: Knex, revisionId: number, file: Buffer | undefined) {
  await knex.transaction(async (trx) => {
    await lockEditable(trx, revisionId);
    const check = await checkBomCsv(trx, file);
    if (!check.ok) {
      const fields = Object.fromEntries(check.rows.filter((r) => r.problems.length).map((r) => [`row ${r.row}`, r.problems.join('; ')]));
      throw invalid(`${check.bad} of ${check.total} rows need fixing; nothing was imported`, fields);
    }
    await trx('bom_lines').where({ revision_id: revisionId }).delete();
    await trx('bom_lines').insert(check.rows.map((r, position) => ({
      revision_id: revisionId, part_id: r.partId!, quantity: r.quantity!, designators: r.designators.join(' '), notes: r.notes, position,
    })));
  });
  return getRevision(knex, revisionId);
}

async function checkLine(trx: Knex.Transaction, revisionId: number, input: BomLineInput, exceptLineId?: number) {
  if (!(await trx('parts').where({ id: input.partId }).first('id'))) throw invalid('Choose a part from the list', { partId: 'No such part' });
  const designators = splitDesignators(input.designators);
  if (designators.length > 0 && designators.length !== input.quantity) {
    throw invalid('Designators and quantity disagree', { designators: `${designators.length} designators for quantity ${input.quantity}` });
  }
  if (new Set(designators).size !== designators.length) throw invalid('A designator is repeated', { designators: 'Each designator once' });
  const others = await trx('bom_lines').where({ revision_id: revisionId }).modify((q) => { if (exceptLineId) q.whereNot({ id: exceptLineId }); }).pluck('designators');
  const taken = new Set(others.flatMap((d: string) => splitDesignators(d)));
  const clash = designators.find((d) => taken.has(d));
  if (clash) throw invalid('A designator is already used on this BOM', { designators: `${clash} is already on another line` });
  return designators.join(' ');
}

export async function addBomLine(knex: Knex, revisionId: number, input: BomLineInput) {
  await knex.transaction(async (trx) => {
    await lockEditable(trx, revisionId);
    const designators = await checkLine(trx, revisionId, input);
    const [{ max }] = await trx('bom_lines').where({ revision_id: revisionId }).max<{ max: number | null }[]>('position as max');
    await trx('bom_lines').insert({ revision_id: revisionId, part_id: input.partId, quantity: input.quantity, designators, notes: input.notes, needs_lot: input.needsLot, position: (max ?? -1) + 1 });
  });
  return getRevision(knex, revisionId);
}

export async function updateBomLine(knex: Knex, lineId: number, input: BomLineInput) {
  const line = await knex('bom_lines').where({ id: lineId }).first('revision_id');
  if (!line) throw notFound('No such BOM line');
  await knex.transaction(async (trx) => {
    await lockEditable(trx, line.revision_id);
    const designators = await checkLine(trx, line.revision_id, input, lineId);
    await trx('bom_lines').where({ id: lineId }).update({ part_id: input.partId, quantity: input.quantity, designators, notes: input.notes, needs_lot: input.needsLot });
  });
  return getRevision(knex, line.revision_id);
}

export async function deleteBomLine(knex: Knex, lineId: number) {
  const line = await knex('bom_lines').where({ id: lineId }).first('revision_id');
  if (!line) throw notFound('No such BOM line');
  await knex.transaction(async (trx) => {
    await lockEditable(trx, line.revision_id);
    await trx('bom_lines').where({ id: lineId }).delete();
  });
  return getRevision(knex, line.revision_id);
}
