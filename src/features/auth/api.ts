import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SessionUser } from '../../../shared/roles';
import type { ChangePasswordInput, LoginInput, PasswordResetConfirmInput, PasswordResetRequestInput, RegisterInput } from '../../../shared/schemas/auth';
import { api, ApiError, rememberCsrfToken } from '../../lib/api';

interface SessionBody {
  user: SessionUser;
  csrfToken: string;
}

async function fetchSession(): Promise<SessionUser | null> {
  try {
    const body = await api.get<SessionBody>('/api/auth/me');
    rememberCsrfToken(body.csrfToken);
    return body.user;
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) return null;
    throw error;
  }
}

export const sessionQuery = () => queryOptions({ queryKey: ['session'], queryFn: fetchSession, staleTime: 60_000 });

export const useSession = () => useQuery(sessionQuery());

function useSignedIn() {
  const client = useQueryClient();
  return (body: SessionBody) => {
    rememberCsrfToken(body.csrfToken);
    client.clear();
    client.setQueryData(sessionQuery().queryKey, body.user);
  };
}

export function useLogin() {
  const signedIn = useSignedIn();
  return useMutation({ mutationFn: (input: LoginInput) => api.post<SessionBody>('/api/auth/login', input), onSuccess: signedIn });
}

/**
 * Registration answers the same whether or not the address already had an account, and never
 * signs in; so the client signs in next with what was typed (a new account, or its owner's own).
 */
export function useRegister() {
  const signedIn = useSignedIn();
  return useMutation({
    mutationFn: async (input: RegisterInput) => {
      await api.post<{ message: string }>('/api/auth/register', input);
      return api.post<SessionBody>('/api/auth/login', { email: input.email, password: input.password });
    },
    onSuccess: signedIn,
  });
}

export function useLogout() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/logout'),
    onSuccess: () => {
      client.clear();
      client.setQueryData(sessionQuery().queryKey, null);
    },
  });
}

export const useChangePassword = () =>
  useMutation({ mutationFn: (input: ChangePasswordInput) => api.post<void>('/api/auth/password', input) });

/** Asks for a reset link; the answer's message is the same whether or not the address has an account. */
export const useRequestPasswordReset = () =>
  useMutation({ mutationFn: (input: PasswordResetRequestInput) => api.post<{ message: string }>('/api/auth/password-reset', input) });

/** Sets a new password from the mailed link; does not sign in. */
export const useConfirmPasswordReset = () =>
  useMutation({ mutationFn: (input: PasswordResetConfirmInput) => api.post<void>('/api/auth/password-reset/confirm', input) });
