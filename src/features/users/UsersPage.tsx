import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import type { SortDirection } from '../../../shared/schemas/list';
import { useForm } from 'react-hook-form';
import { ROLE_LABELS, ROLES, type Role } from '../../../shared/roles';
import { createUserSchema, type CreateUserInput, type UserListQuery } from '../../../shared/schemas/auth';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useSession } from '../auth/api';
import { useCreateUser, useUpdateUser, useUsers, type UserRow } from './api';

function CreateUserForm() {
  const create = useCreateUser();
  const toast = useToast();
  const form = useForm<CreateUserInput>({ resolver: zodResolver(createUserSchema), defaultValues: { role: 'assembler' } });
  const errors = form.formState.errors;
  const onSubmit = form.handleSubmit((input) =>
    create.mutate(input, {
      onSuccess: ({ user }) => {
        form.reset({ role: input.role, name: '', email: '', password: '' });
        toast(`${user.name} can now sign in as ${ROLE_LABELS[user.role].toLowerCase()}`);
      },
      onError: (error) => {
        applyFieldErrors(error, form.setError);
        toast(error.message, 'alarm');
      },
    }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 rounded-lg bg-white p-6 shadow-sm md:grid-cols-2">
      <h2 className="text-xl font-bold text-spruce-900 md:col-span-2">Add a person</h2>
      <TextField label="Name" error={errors.name?.message} {...form.register('name')} />
      <TextField label="E-mail" type="email" error={errors.email?.message} {...form.register('email')} />
      <div className="flex flex-col gap-1">
        <label htmlFor="new-user-role" className="font-semibold">Role</label>
        <select id="new-user-role" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3" {...form.register('role')}>
          {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
        </select>
      </div>
      <TextField label="First password" type="password" autoComplete="new-password" hint="They can change it under My account" error={errors.password?.message} {...form.register('password')} />
      <div className="md:col-span-2"><Button type="submit" busy={create.isPending}>Add person</Button></div>
    </form>
  );
}

export default function UsersPage() {
  const [who, setWho] = useState<'staff' | 'customers' | 'everyone'>('staff');
  const [search, setSearch] = useState('');
  const [view, setView] = useState<{ sort: UserListQuery['sort']; dir: SortDirection; page: number }>({ sort: 'name', dir: 'asc', page: 1 });
  const users = useUsers({ ...view, pageSize: 25, q: search.trim() || undefined, staff: who === 'everyone' ? undefined : who === 'staff' });
  const update = useUpdateUser();
  const toast = useToast();
  const me = useSession().data;
  const columns = useMemo<ColumnDef<UserRow, unknown>[]>(() => [
    { id: 'name', accessorKey: 'name', header: 'Name', cell: (c) => <span className="font-semibold">{String(c.getValue())}</span> },
    { id: 'email', accessorKey: 'email', header: 'E-mail' },
    {
      id: 'role', accessorKey: 'role', header: 'Role',
      cell: ({ row }) => (
        <select
          aria-label={`Role of ${row.original.name}`}
          value={row.original.role}
          disabled={row.original.id === me?.id || !row.original.active}
          className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2"
          onChange={(e) =>
            update.mutate({ id: row.original.id, role: e.target.value as Role }, {
              onSuccess: () => toast(`${row.original.name} is now ${ROLE_LABELS[e.target.value as Role].toLowerCase()}`),
              onError: (error) => toast(error.message, 'alarm'),
            })
          }
        >
          {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
        </select>
      ),
    },
    { accessorKey: 'active', header: 'Status', enableSorting: false, cell: ({ row }) => (row.original.active ? 'Active' : 'Deactivated') },
    {
      id: 'actions', header: () => <span className="sr-only">Actions</span>, enableSorting: false,
      cell: ({ row }) =>
        row.original.id === me?.id ? null : row.original.active ? (
          <ConfirmButton
            label="Deactivate"
            question={`Deactivate ${row.original.name}? They are signed out everywhere at once and cannot sign in until reactivated.`}
            confirmLabel="Deactivate"
            onConfirm={() => update.mutate({ id: row.original.id, active: false }, { onSuccess: () => toast(`${row.original.name} is deactivated`) })}
          />
        ) : (
          <Button variant="secondary" onClick={() => update.mutate({ id: row.original.id, active: true }, { onSuccess: () => toast(`${row.original.name} is active again`) })}>
            Reactivate
          </Button>
        ),
    },
  ], [me?.id, toast, update]);

  return (
    <>
      <PageHeader title="People & roles" />
      <div className="flex flex-col gap-8">
        <div className="flex flex-wrap items-end gap-4">
          <label className="flex flex-col gap-1 font-semibold">Show
            <select value={who} onChange={(e) => { setWho(e.target.value as typeof who); setView((v) => ({ ...v, page: 1 })); }} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal">
              <option value="staff">Staff</option><option value="customers">Customers</option><option value="everyone">Everyone</option>
            </select>
          </label>
          <label className="flex flex-col gap-1 font-semibold">Search
            <input type="search" value={search} placeholder="Name or e-mail" onChange={(e) => { setSearch(e.target.value); setView((v) => ({ ...v, page: 1 })); }} className="min-h-11 rounded-md border border-spruce-700/40 px-3 font-normal" />
          </label>
        </div>
        {users.isPending ? <Loading /> : users.isError ? <ErrorState error={users.error} retry={() => users.refetch()} /> : users.data.total === 0 ? (
          <EmptyState title={search ? 'Nobody matches' : 'Nobody here yet'} />
        ) : (
          <DataTable data={users.data.items} columns={columns} caption="People who can sign in" rowClassName={(u) => (u.active ? '' : 'text-ink-soft')} server={{
            sort: view.sort, dir: view.dir, page: users.data, noun: ['person', 'people'],
            onSort: (sort, dir) => setView({ sort: sort as UserListQuery['sort'], dir, page: 1 }), onPage: (page) => setView((v) => ({ ...v, page })),
          }} />
        )}
        <CreateUserForm />
      </div>
    </>
  );
}
