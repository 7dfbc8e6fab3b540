import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Role } from '../../../shared/roles';
import type { CreateUserInput, UpdateUserInput, UserListQuery } from '../../../shared/schemas/auth';
import { listSearch, type Page } from '../../../shared/schemas/list';
import { api } from '../../lib/api';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  created_at: string;
}

export type UserListParams = Partial<UserListQuery>;
export const userKeys = { all: ['users'] as const, lists: () => ['users', 'list'] as const, list: (params: UserListParams) => ['users', 'list', params] as const };

/** One page of people, as the server filters, sorts and pages them. */
export const usersQuery = (params: UserListParams) =>
  queryOptions({ queryKey: userKeys.list(params), queryFn: () => api.get<Page<UserRow>>(`/api/users${listSearch(params)}`), placeholderData: keepPreviousData });

export const useUsers = (params: UserListParams) => useQuery(usersQuery(params));

export function useCreateUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateUserInput) => api.post<{ user: UserRow }>('/api/users', input),
    onSuccess: () => client.invalidateQueries({ queryKey: userKeys.lists() }),
  });
}

/** A role change the owner can still undo (for `undoSeconds` after it was made). */
export interface RoleChange {
  id: number;
  from: Role;
  to: Role;
  undoSeconds: number;
}

export function useUpdateUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: UpdateUserInput & { id: number }) => api.patch<{ user: UserRow; roleChange: RoleChange | null }>(`/api/users/${id}`, input),
    onSuccess: () => client.invalidateQueries({ queryKey: userKeys.lists() }),
  });
}

export function useUndoRoleChange() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (changeId: number) => api.post<{ user: UserRow }>(`/api/role-changes/${changeId}/undo`, {}),
    onSuccess: () => client.invalidateQueries({ queryKey: userKeys.lists() }),
  });
}
