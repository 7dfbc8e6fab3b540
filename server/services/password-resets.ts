// "Forgot password": a one-time link by e-mail. Only a sha256 of the token is stored (a copy of the
// database resets nobody's password), a token works once and for an hour, and a reset ends the
// account's other sessions. The request answers the same whether or not the address has an
// account (the route says so); the mail goes through the outbox like every other mail.
import { createHash, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { passwordProblem } from '../../shared/schemas/password';
import type { PasswordResetConfirmInput } from '../../shared/schemas/auth';
import { invalid } from '../errors';
import { enqueueMail } from './mail/outbox';
import { endSessions, hashPassword } from './users';

/** How long a mailed link works. */
export const RESET_TOKEN_TTL_MINUTES = 60;

/** The one answer to a link that is unknown, used or expired: which of the three is nobody's business. */
export const RESET_LINK_DEAD = 'This link has expired or has already been used: ask for a new one';

export const hashResetToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/** The page of the client that reads `token` from the link (src/lib/navigation.ts `paths.resetPassword`). */
export const resetLink = (publicUrl: string, token: string) => `${publicUrl}/reset-password?token=${encodeURIComponent(token)}`;

/**
 * Makes a reset token for an active account with this e-mail and queues its mail; does nothing for
 * any other address. Returns nothing either way, so the caller cannot tell the two apart.
 */
export async function requestPasswordReset(knex: Knex, publicUrl: string, email: string): Promise<void> {
  await knex.transaction(async (trx) => {
    const user = await trx('users').where({ email, active: true }).first('id', 'name', 'email');
    if (!user) return;
    // 32 random bytes (256 bits), base64url: unguessable, and safe in a URL as it is.
    const token = randomBytes(32).toString('base64url');
    const [row] = await trx('password_resets')
      .insert({
        user_id: user.id,
        token_hash: hashResetToken(token),
        expires_at: trx.raw(`now() + make_interval(mins => ?)`, [RESET_TOKEN_TTL_MINUTES]),
      })
      .returning('id');
    await enqueueMail(trx, {
      dedupeKey: `password-reset:${row.id}`,
      template: 'password-reset',
      to: user.email,
      data: { name: user.name, resetUrl: resetLink(publicUrl, token), validMinutes: RESET_TOKEN_TTL_MINUTES },
    });
  });
}

/**
 * Sets a new password from a mailed token: the token must be known, unused and unexpired (400 on
 * the `token` field otherwise), the password must pass the one password rule (400 on `password`).
 * In one transaction: the password changes, every outstanding token of the account is spent, and
 * every session of the account but the caller's own is deleted.
 */
export async function confirmPasswordReset(knex: Knex, input: PasswordResetConfirmInput, keepSessionId: string): Promise<void> {
  const tokenHash = hashResetToken(input.token);
  const live = () => knex('password_resets as r').join('users as u', 'u.id', 'r.user_id')
    .where({ 'r.token_hash': tokenHash, 'u.active': true }).whereNull('r.used_at').andWhere('r.expires_at', '>', knex.fn.now());
  // A first look outside the transaction, so a dead link or a refused password costs no bcrypt and holds no lock.
  const found = await live().first('r.id', 'r.user_id', 'u.email');
  if (!found) throw invalid(RESET_LINK_DEAD, { token: RESET_LINK_DEAD });
  const problem = passwordProblem(input.password, found.email);
  if (problem) throw invalid('Some fields need attention', { password: problem });
  const passwordHash = await hashPassword(input.password);
  await knex.transaction(async (trx) => {
    // Checked again under the row's lock: of two requests with one token, exactly one sets a password.
    const reset = await trx('password_resets').where({ id: found.id }).whereNull('used_at')
      .andWhere('expires_at', '>', trx.fn.now()).forUpdate().first('id');
    if (!reset) throw invalid(RESET_LINK_DEAD, { token: RESET_LINK_DEAD });
    await trx('users').where({ id: found.user_id }).update({ password_hash: passwordHash, updated_at: trx.fn.now() });
    await trx('password_resets').where({ user_id: found.user_id }).whereNull('used_at').update({ used_at: trx.fn.now() });
    await endSessions(trx, found.user_id, keepSessionId);
  });
}

/** Housekeeping: reset rows a day past their expiry are of no further use. */
export const deleteOldResets = (knex: Knex) =>
  knex('password_resets').where('expires_at', '<', knex.raw(`now() - interval '1 day'`)).delete();
