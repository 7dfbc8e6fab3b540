import { DomainError, conflict, invalid, notFound } from '../errors';

// The one translation of PostgreSQL's error codes into answers a client can act on. The error
// middleware calls it for anything a service did not translate itself, so a bad value that slips
// past a schema is a 400/404/409 in words, never a 500 that prints SQL.
// Codes: https://www.postgresql.org/docs/current/errcodes-appendix.html

export interface PgError {
  code: string;
  table?: string;
  column?: string;
  constraint?: string;
  detail?: string;
}

export function isPgError(error: unknown): error is PgError {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && /^[0-9A-Z]{5}$/.test(code);
}

export const pgCode = (error: unknown) => (isPgError(error) ? error.code : undefined);

/** Deadlock or serialization failure: the whole transaction may simply be run again. */
export const isRetryable = (error: unknown) => ['40P01', '40001'].includes(pgCode(error) ?? '');

const words = (name: string) => name.replace(/_/g, ' ');
const singular = (table: string) => words(table).replace(/ies$/, 'y').replace(/(ch|sh|ss|x)es$/, '$1').replace(/s$/, '');
/** A column as the API names it (snake_case → camelCase), for the `fields` map. */
const field = (column: string) => column.replace(/_([a-z])/g, (_m, c: string) => c.toUpperCase());
const keyColumn = (detail?: string) => /^Key \(([a-z_0-9, ]+)\)/.exec(detail ?? '')?.[1]?.split(', ')[0];

const unavailable = (message: string) => new DomainError(503, 'unavailable', message);

/** The DomainError for a PostgreSQL error, or null when it is not one we answer in words. */
export function translatePgError(error: unknown): DomainError | null {
  if (!isPgError(error)) return null;
  const column = error.column ?? keyColumn(error.detail);
  const fields = column ? { [field(column)]: 'Not a valid value' } : undefined;
  switch (error.code) {
    case '22003': // numeric value out of range
      return invalid('A number in the request is out of range', fields);
    case '22P02': // invalid text representation (e.g. "abc" for an integer)
      return invalid('A value in the request has the wrong type', fields);
    case '22007': // invalid datetime format
    case '22008': // datetime field overflow
      return invalid('A date in the request is not a valid day', fields);
    case '22001': // string too long for its column
      return invalid('A text in the request is too long', fields);
    case '22021': // invalid byte sequence (a NUL byte in text)
    case '22P05': // untranslatable character
      return invalid('A text in the request contains a character that cannot be stored (NUL)', fields);
    case '23502': // not null
      return invalid('A required value is missing', fields);
    case '23503': { // foreign key
      const missing = /is not present in table "([a-z_0-9]+)"/.exec(error.detail ?? '')?.[1];
      if (missing) return notFound(`The ${singular(missing)} this refers to does not exist`);
      const user = /referenced from table "([a-z_0-9]+)"/.exec(error.detail ?? '')?.[1];
      return conflict(user ? `This is still used by ${words(user)}, so it cannot be removed or changed` : 'This is still in use elsewhere');
    }
    case '23505': // unique
      return new DomainError(409, 'conflict', column ? `Another record already has this ${words(column)}` : 'That already exists', column ? { [field(column)]: 'Already taken' } : undefined);
    case '23514': // check
      return new DomainError(409, 'conflict', `The change breaks a rule of the ${error.table ? singular(error.table) : 'record'} it touches`);
    case '40P01': // deadlock (after withTransactionRetry gave up)
    case '40001': // serialization failure
    case '55P03': // lock not available
      return unavailable('The shop is busy with the same records: try again in a moment');
    case '57014': // statement timeout / cancelled
      return unavailable('The request took too long and was stopped: try again in a moment');
    case '53300': // too many connections
    case '57P01': // admin shutdown
    case '57P03': // cannot connect now
      return unavailable('The database is not available right now: try again in a moment');
    default:
      return null;
  }
}
