import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import type { Role, SessionUser } from '../../shared/roles';
import type { CreateUserInput, RegisterInput, UpdateUserInput } from '../../shared/schemas/auth';
import { conflict, invalid, isUniqueViolation, notFound } from '../errors';
import { enqueueMail } from './mail/outbox';

const HASH_ROUNDS = 12;
// Compared against when the e-mail is unknown, so a miss costs as long as a wrong password.
const DUMMY_HASH = bcrypt.hashSync('kneepoint-no-such-user', HASH_ROUNDS);

interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  password_hash: string;
  active: boolean;
  created_at: Date;
  updated_at: Date | Knex.Raw;
}

const toSessionUser = (row: UserRow): SessionUser => ({ id: row.id, email: row.email, name: row.name, role: row.role });

export const hashPassword = (password: string) => bcrypt.hash(password, HASH_ROUNDS);

/** Returns the user for a correct e-mail and password of an active account, else null. */
export async function authenticate(knex: Knex, email: string, password: string): Promise<SessionUser | null> {
  const row = await knex<UserRow>('users').where({ email }).first();
  const ok = await bcrypt.compare(password, row?.password_hash ?? DUMMY_HASH);
  if (!row || !ok || !row.active) return null;
  return toSessionUser(row);
}

/** The signed-in user as stored now; null once deactivated, which ends their sessions at once. */
export async function findActiveUser(knex: Knex, id: number): Promise<SessionUser | null> {
  const row = await knex<UserRow>('users').where({ id, active: true }).first();
  return row ? toSessionUser(row) : null;
}

async function insertUser(knex: Knex, input: { name: string; email: string; role: Role; password: string }) {
  try {
    const [row] = await knex<UserRow>('users')
      .insert({ name: input.name, email: input.email, role: input.role, password_hash: await hashPassword(input.password) })
      .returning('*');
    return toSessionUser(row);
  } catch (error) {
    if (isUniqueViolation(error)) throw conflict('An account with this e-mail already exists');
    throw error;
  }
}

// The welcome mail is queued in the same transaction as the account, so it exists exactly when the account does.
export const registerCustomer = (knex: Knex, input: RegisterInput) =>
  knex.transaction(async (trx) => {
    const user = await insertUser(trx, { ...input, role: 'customer' });
    await enqueueMail(trx, { dedupeKey: `welcome:${user.id}`, template: 'welcome', to: user.email, data: { name: user.name } });
    return user;
  });
export const createUser = (knex: Knex, input: CreateUserInput) => insertUser(knex, input);

export async function listUsers(knex: Knex) {
  return knex<UserRow>('users')
    .select('id', 'email', 'name', 'role', 'active', 'created_at')
    .orderBy([{ column: 'active', order: 'desc' }, { column: 'role' }, { column: 'name' }]);
}

export async function updateUser(knex: Knex, actorId: number, id: number, input: UpdateUserInput) {
  return knex.transaction(async (trx) => {
    const row = await trx<UserRow>('users').where({ id }).forUpdate().first();
    if (!row) throw notFound('No such user');
    if (id === actorId && (input.active === false || (input.role && input.role !== row.role))) {
      throw conflict('You cannot deactivate yourself or change your own role');
    }
    const [updated] = await trx<UserRow>('users')
      .where({ id })
      .update({ ...input, updated_at: trx.fn.now() })
      .returning(['id', 'email', 'name', 'role', 'active', 'created_at']);
    if (input.active === false) {
      // Their sessions stop working at once: delete every stored session of theirs.
      await trx.raw(`DELETE FROM "session" WHERE (sess -> 'passport' ->> 'user') = ?`, [String(id)]);
    }
    return updated;
  });
}

export async function changePassword(knex: Knex, id: number, currentPassword: string, newPassword: string) {
  const row = await knex<UserRow>('users').where({ id }).first();
  if (!row) throw notFound('No such user');
  if (!(await bcrypt.compare(currentPassword, row.password_hash))) {
    throw invalid('Some fields need attention', { currentPassword: 'This is not your current password' });
  }
  await knex('users').where({ id }).update({ password_hash: await hashPassword(newPassword), updated_at: knex.fn.now() });
}
