import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { ROLE_LABELS, type Role, type SessionUser } from '../../shared/roles';
import { ROLE_CHANGE_UNDO_SECONDS, type CreateUserInput, type RegisterInput, type UpdateUserInput, type UserListQuery } from '../../shared/schemas/auth';
import { containsPattern, paged } from '../http/paged';
import { conflict, invalid, isUniqueViolation, notFound } from '../errors';
import { passwordProblem } from '../../shared/schemas/password';
import { enqueueMail } from './mail/outbox';

const HASH_ROUNDS = 12;
// Compared against when the e-mail is unknown, so a miss costs as long as a wrong password.
const DUMMY_HASH = bcrypt.hashSync('kneepoint-no-such-user', HASH_ROUNDS);

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  password_hash: string;
  active: boolean;
  created_at: Date;
  updated_at: Date | Knex.Raw;
}

/** The fields of an account a request carries (also used by the session store's combined read). */
export const toSessionUser = (row: Pick<UserRow, 'id' | 'email' | 'name' | 'role'>): SessionUser => ({ id: row.id, email: row.email, name: row.name, role: row.role });

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

const HOUR_MS = 3600_000;

/**
 * Registers a customer, answering the same whatever the e-mail: a new address gets an account and
 * a welcome mail; an address that has an account gets no second one, and its owner a mail saying
 * so (at most one an hour). The password is hashed either way, so both take as long. Mail is
 * queued in the same transaction as the account, so it exists exactly when the account does.
 */
export async function registerCustomer(knex: Knex, input: RegisterInput): Promise<void> {
  const passwordHash = await hashPassword(input.password);
  await knex.transaction(async (trx) => {
    const [created] = await trx<UserRow>('users')
      .insert({ name: input.name, email: input.email, role: 'customer', password_hash: passwordHash })
      .onConflict('email').ignore()
      .returning('*');
    if (created) {
      await enqueueMail(trx, { dedupeKey: `welcome:${created.id}`, template: 'welcome', to: created.email, data: { name: created.name } });
      return;
    }
    const owner = await trx<UserRow>('users').where({ email: input.email }).first();
    if (!owner) return;
    const hour = Math.floor(Date.now() / HOUR_MS);
    await enqueueMail(trx, { dedupeKey: `account-exists:${owner.id}:${hour}`, template: 'account-exists', to: owner.email, data: { name: owner.name } });
  });
}
export const createUser = (knex: Knex, input: CreateUserInput) => insertUser(knex, input);

const USER_SORT: Record<UserListQuery['sort'], string> = { name: 'name', email: 'email', role: 'role', createdAt: 'created_at' };

/** People who can sign in, one page at a time: active first is left to the filters; staff or customers. */
export async function listUsers(knex: Knex, params: UserListQuery) {
  const base = () => {
    const q = knex<UserRow>('users');
    if (params.role) q.where('role', params.role);
    if (params.staff === true) q.whereNot('role', 'customer');
    if (params.staff === false) q.where('role', 'customer');
    if (params.q) { const like = containsPattern(params.q); q.where((w) => w.whereILike('name', like).orWhereILike('email', like)); }
    return q;
  };
  return paged(params, {
    count: base(), rows: base().select('id', 'email', 'name', 'role', 'active', 'created_at'),
    sortColumns: USER_SORT, tieBreak: 'id', map: (u: Pick<UserRow, 'id' | 'email' | 'name' | 'role' | 'active' | 'created_at'>) => u,
  });
}

const PUBLIC_COLUMNS = ['id', 'email', 'name', 'role', 'active', 'created_at'] as const;

export interface RoleChangeView {
  id: number;
  from: Role;
  to: Role;
  /** Seconds left to undo it (ROLE_CHANGE_UNDO_SECONDS when just made). */
  undoSeconds: number;
}

/**
 * Changes a person's name, role or whether they may sign in. A role change is recorded in
 * `role_changes` (the answer's `roleChange` names it, for undoing within a minute); with
 * `fromRole` it is refused (409) when the role is no longer the one the owner confirmed from.
 * Nobody changes their own role or deactivates themselves, so the shop always keeps an owner.
 */
export async function updateUser(knex: Knex, actorId: number, id: number, input: UpdateUserInput) {
  return knex.transaction(async (trx) => {
    const row = await trx<UserRow>('users').where({ id }).forUpdate().first();
    if (!row) throw notFound('No such user');
    const { fromRole, ...change } = input;
    const roleChanges = change.role !== undefined && change.role !== row.role;
    if (id === actorId && (change.active === false || roleChanges)) {
      throw conflict('You cannot deactivate yourself or change your own role');
    }
    if (roleChanges && fromRole !== undefined && fromRole !== row.role) {
      throw conflict(`${row.name} is ${ROLE_LABELS[row.role].toLowerCase()} now, not ${ROLE_LABELS[fromRole].toLowerCase()}: look again before changing the role`);
    }
    const [updated] = await trx<UserRow>('users')
      .where({ id })
      .update({ ...change, updated_at: trx.fn.now() })
      .returning([...PUBLIC_COLUMNS]);
    let roleChange: RoleChangeView | null = null;
    if (roleChanges) {
      const [recorded] = await trx('role_changes').insert({ user_id: id, from_role: row.role, to_role: change.role, changed_by: actorId }).returning('id');
      roleChange = { id: recorded.id, from: row.role, to: change.role!, undoSeconds: ROLE_CHANGE_UNDO_SECONDS };
    }
    if (change.active === false) {
      // Their sessions stop working at once: delete every stored session of theirs.
      await endSessions(trx, id);
    }
    return { user: updated, roleChange };
  });
}

/**
 * Undoes a role change within ROLE_CHANGE_UNDO_SECONDS of making it (measured by the database's
 * clock): the person gets the role back that they had before. 404 for an unknown change; 409 when
 * it is already undone, the minute has passed, or their role has changed again since.
 */
export async function undoRoleChange(knex: Knex, actorId: number, changeId: number) {
  return knex.transaction(async (trx) => {
    const found = await trx('role_changes').where({ id: changeId }).first('user_id');
    if (!found) throw notFound('No such role change');
    // The person first, then the change (the order every role change takes).
    const person = await trx<UserRow>('users').where({ id: found.user_id }).forUpdate().first();
    const change = await trx('role_changes').where({ id: changeId }).forUpdate()
      .first('id', 'user_id', 'from_role', 'to_role', 'undone_at', trx.raw('(now() - changed_at) > make_interval(secs => ?) AS expired', [ROLE_CHANGE_UNDO_SECONDS]));
    if (!person || !change) throw notFound('No such role change');
    if (change.undone_at) throw conflict(`That change is already undone: ${person.name} is ${ROLE_LABELS[person.role].toLowerCase()}`);
    if (change.expired) throw conflict(`The minute to undo it has passed: change ${person.name}’s role again instead`);
    const later = await trx('role_changes').where('user_id', change.user_id).where('id', '>', change.id).first('id');
    if (later || person.role !== change.to_role) throw conflict(`${person.name}’s role has changed again since: change it again instead`);
    const [user] = await trx<UserRow>('users').where({ id: person.id })
      .update({ role: change.from_role, updated_at: trx.fn.now() }).returning([...PUBLIC_COLUMNS]);
    await trx('role_changes').where({ id: change.id }).update({ undone_at: trx.fn.now(), undone_by: actorId });
    return { user };
  });
}

/**
 * Changes a password after checking the current one, and ends every other session of the account
 * (a thief signed in elsewhere is signed out); the session making the change is kept.
 */
export async function changePassword(knex: Knex, id: number, input: { currentPassword: string; newPassword: string }, keepSessionId: string) {
  const row = await knex<UserRow>('users').where({ id }).first();
  if (!row) throw notFound('No such user');
  if (!(await bcrypt.compare(input.currentPassword, row.password_hash))) {
    throw invalid('Some fields need attention', { currentPassword: 'This is not your current password' });
  }
  const problem = passwordProblem(input.newPassword, row.email);
  if (problem) throw invalid('Some fields need attention', { newPassword: problem });
  const passwordHash = await hashPassword(input.newPassword);
  await knex.transaction(async (trx) => {
    await trx('users').where({ id }).update({ password_hash: passwordHash, updated_at: trx.fn.now() });
    await endSessions(trx, id, keepSessionId);
  });
}

/** Deletes the account's stored sessions (connect-pg-simple's table), all or all but one. */
export async function endSessions(trx: Knex.Transaction, userId: number, exceptSessionId?: string) {
  await trx.raw(`DELETE FROM "session" WHERE (sess -> 'passport' ->> 'user') = ? AND sid <> ?`, [String(userId), exceptSessionId ?? '']);
}
