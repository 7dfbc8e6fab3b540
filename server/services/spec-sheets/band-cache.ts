// The option's nominal P5–P95 band is slow (~0.4 s) and the same for every unit of an option,
// so it is computed once per circuit and kept in PostgreSQL, where every server instance finds it.
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { CircuitSpec } from '../../../shared/engine';
import { compute } from '../../compute/pool';
import type { NominalBand } from './sheet-profile';

type Db = Knex | Knex.Transaction;

const BAND_POINTS = 7;
const BAND_DRAWS = 40;

/** JSON with sorted keys, so the same circuit always hashes the same however it was built. */
function canonical(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined).sort(([a], [b]) => a.localeCompare(b));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

/** sha256 of the circuit and the band's own settings (points, draws), e.g. '3f1c…'. */
export function circuitHash(spec: CircuitSpec) {
  return createHash('sha256').update(canonical({ spec, points: BAND_POINTS, draws: BAND_DRAWS })).digest('hex');
}

/** The cached band, computing and storing it on a miss (a concurrent insert of the same band is harmless). */
export async function cachedNominalBand(db: Db, spec: CircuitSpec): Promise<NominalBand> {
  const hash = circuitHash(spec);
  const hit = await db('sheet_band_cache').where({ circuit_hash: hash }).first('band');
  if (hit) return hit.band as NominalBand;
  const band = await compute.sheetBand({ spec, points: BAND_POINTS, draws: BAND_DRAWS });
  await db('sheet_band_cache').insert({ circuit_hash: hash, band: JSON.stringify(band) }).onConflict('circuit_hash').ignore();
  return band;
}
