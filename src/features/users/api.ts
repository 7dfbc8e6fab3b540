import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Role } from '../../../shared/roles';
import type { CreateUserInput, UpdateUserInput } from '../../../shared/schemas/auth';
import { api } from '../../lib/api';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  created_at: string;
}

export const usersQuery = () =>
  queryOptions({ queryKey: ['users', 'list'], queryFn: () => api.get<{ users: UserRow[] }>('/api/users').then((b) => b.users) });

export const useUsers = () => useQuery(usersQuery());

export function useCreateUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateUserInput) => api.post<{ user: UserRow }>('/api/users', input),
    onSuccess: () => client.invalidateQueries({ queryKey: usersQuery().queryKey }),
  });
}

export function useUpdateUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: UpdateUserInput & { id: number }) => api.patch<{ user: UserRow }>(`/api/users/${id}`, input),
    onSuccess: () => client.invalidateQueries({ queryKey: usersQuery().queryKey }),
  });
}
