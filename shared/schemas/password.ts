// The one password rule, for registration, password change and any later reset, on both sides.
// It follows NIST SP 800-63B §5.1.1.2 (memorized secrets; from memory, not re-read here): a minimum
// length, a generous maximum, no composition rules, and a check against passwords known from
// breaches, repetitive or sequential strings, and context-specific words (the e-mail itself).
import { dictionary } from '@zxcvbn-ts/language-common';
import { z } from 'zod';
import { str } from './common';

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 200;

// The breached-password list that ships with zxcvbn-ts (about 49,000 entries, lower case); only
// those long enough to pass the length rule can matter, which keeps the set small.
const COMMON = new Set(dictionary['passwords-common'].filter((p) => p.length >= PASSWORD_MIN));

/** True for "aaaaaaaaaa", "          ", "0123456789", "zyxwvutsrq": one character, or a run of neighbours. */
function repetitiveOrSequential(password: string) {
  const codes = [...password].map((c) => c.codePointAt(0)!);
  const steps = new Set(codes.slice(1).map((c, i) => c - codes[i]));
  return steps.size === 1 && [...steps].every((s) => Math.abs(s) <= 1);
}

/** Why a new password is refused, or null. The e-mail is the account's, when known. */
export function passwordProblem(password: string, email?: string): string | null {
  if (password.length < PASSWORD_MIN) return `Use at least ${PASSWORD_MIN} characters`;
  if (password.length > PASSWORD_MAX) return `Use at most ${PASSWORD_MAX} characters`;
  const lower = password.toLowerCase();
  if (lower.trim() === '' || repetitiveOrSequential(lower)) return 'Use something less predictable than a repeated or sequential run of characters';
  if (COMMON.has(lower)) return 'This password is on a list of common passwords known from breaches: choose another';
  if (email) {
    const address = email.trim().toLowerCase();
    const local = address.split('@')[0];
    if (lower.includes(address) || lower === local) return 'Do not use your e-mail address as your password';
  }
  return null;
}

/** A new password on its own (the e-mail check is added where the e-mail is known). */
export const newPasswordSchema = str().superRefine((value, ctx) => {
  const problem = passwordProblem(value);
  if (problem) ctx.addIssue({ code: 'custom', message: problem });
});

/** Adds the e-mail check to an object schema with `email` and a password field. */
export function refuseEmailAsPassword<T extends { email: string }>(field: keyof T & string) {
  return (value: T, ctx: z.RefinementCtx) => {
    const password = value[field];
    if (typeof password !== 'string' || passwordProblem(password)) return;
    const problem = passwordProblem(password, value.email);
    if (problem) ctx.addIssue({ code: 'custom', path: [field], message: problem });
  };
}
