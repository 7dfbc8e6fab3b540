import { z } from 'zod';
import { ROLES } from '../roles';
import { str } from './common';
import { newPasswordSchema, refuseEmailAsPassword } from './password';
import { boolParam, listQuery } from './list';

// One schema per request shape: the forms, the client types and the server's validation share them.
const email = str().trim().toLowerCase().email('Enter a valid e-mail address').max(200);
const newPassword = newPasswordSchema;

export const loginSchema = z.object({
  email,
  password: str().min(1, 'Enter your password').max(200),
});
export type LoginInput = z.infer<typeof loginSchema>;

export const registerSchema = z.object({
  name: str().trim().min(1, 'Enter your name').max(120),
  email,
  password: newPassword,
}).superRefine(refuseEmailAsPassword('password'));
export type RegisterInput = z.infer<typeof registerSchema>;

export const changePasswordSchema = z.object({
  currentPassword: str().min(1, 'Enter your current password').max(200),
  newPassword,
});
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;

export const createUserSchema = z.object({
  name: str().trim().min(1, 'Enter a name').max(120),
  email,
  role: z.enum(ROLES, { message: 'Choose a role' }),
  password: newPassword,
}).superRefine(refuseEmailAsPassword('password'));
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** How long the owner can undo a role change after making it. */
export const ROLE_CHANGE_UNDO_SECONDS = 60;

export const updateUserSchema = z
  .object({
    role: z.enum(ROLES, { message: 'Choose a role' }).optional(),
    /** The role the owner saw and confirmed the change from; a different current role is a 409. */
    fromRole: z.enum(ROLES, { message: 'Choose a role' }).optional(),
    active: z.boolean().optional(),
    name: str().trim().min(1).max(120).optional(),
  })
  .refine((v) => Object.keys(v).some((k) => k !== 'fromRole'), { message: 'Nothing to change' })
  .refine((v) => v.fromRole === undefined || v.role !== undefined, { message: 'fromRole goes with a new role', path: ['fromRole'] });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

/** The owner's list of people: staff by default (`staff=false` lists customers), sortable, searchable. */
export const userListSchema = listQuery(['name', 'email', 'role', 'createdAt'] as const, { sort: 'name', dir: 'asc' }, {
  role: z.enum(ROLES, { message: 'Choose a role from the list' }).optional(),
  staff: boolParam.optional(),
});
export type UserListQuery = z.infer<typeof userListSchema>;

/** "Forgot password": the address to send a link to (the answer is the same for any address). */
export const passwordResetRequestSchema = z.object({ email });
export type PasswordResetRequestInput = z.infer<typeof passwordResetRequestSchema>;

/** The link's token and the new password (the rule is the one in password.ts; the e-mail check is the server's). */
export const passwordResetConfirmSchema = z.object({
  token: str().trim().min(1, 'Open the link from the mail again: it carries a code this page needs').max(200),
  password: newPassword,
});
export type PasswordResetConfirmInput = z.infer<typeof passwordResetConfirmSchema>;
