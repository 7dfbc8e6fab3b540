import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useEffect, useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { ROLE_LABELS, ROLES, STAFF, type Role } from '../../../shared/roles';
import { createUserSchema, type CreateUserInput, type UserListQuery } from '../../../shared/schemas/auth';
import type { SortDirection } from '../../../shared/schemas/list';
import { Button } from '../../components/ui/Button';
import { ConfirmDialog } from '../../components/ui/ConfirmDialog';
import { DataTable } from '../../components/ui/DataTable';
import { RowMenu, type RowMenuItem } from '../../components/ui/RowMenu';
import { EmptyState, ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useCreateUser, useUndoRoleChange, useUpdateUser, useUsers, type RoleChange, type UserRow } from './api';

type Who = 'staff' | 'customers';
const PAGE_SIZE = 25;
const role = (r: Role) => ROLE_LABELS[r].toLowerCase();

/** What each role may do, in a line: shown when the owner confirms a change to it. */
const ROLE_REACH: Record<Role, string> = {
  owner: 'Owners run everything, including people and roles.',
  planner: 'Planners run the catalog, batches, orders, shipping and the mail the shop sends.',
  assembler: 'Assemblers build the units assigned to them and read the catalog.',
  tester: 'Testers record bench tests and make spec sheets.',
  customer: 'Customers order pedals and see only their own orders.',
};

function CreateUserForm() {
  const create = useCreateUser();
  const toast = useToast();
  const form = useForm<CreateUserInput>({ resolver: zodResolver(createUserSchema), defaultValues: { role: 'assembler' } });
  const errors = form.formState.errors;
  const onSubmit = form.handleSubmit((input) =>
    create.mutate(input, {
      onSuccess: ({ user }) => {
        form.reset({ role: input.role, name: '', email: '', password: '' });
        toast(`${user.name} can now sign in as ${role(user.role)}`);
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

interface ListView { sort: UserListQuery['sort']; dir: SortDirection; page: number; search: string }
const firstView: ListView = { sort: 'name', dir: 'asc', page: 1, search: '' };

/** One list (staff or customers): its own search and pages. */
function PeopleList({ who, view, onView, columns }: { who: Who; view: ListView; onView: (v: ListView) => void; columns: ColumnDef<UserRow, unknown>[] }) {
  const users = useUsers({ sort: view.sort, dir: view.dir, page: view.page, pageSize: PAGE_SIZE, q: view.search.trim() || undefined, staff: who === 'staff' });
  const noun: [string, string] = who === 'staff' ? ['member of staff', 'staff'] : ['customer', 'customers'];
  return (
    <div className="flex flex-col gap-4">
      <label className="flex max-w-md flex-col gap-1 font-semibold">
        {who === 'staff' ? 'Search staff' : 'Search customers'}
        <input type="search" value={view.search} placeholder="Name or e-mail" onChange={(e) => onView({ ...view, search: e.target.value, page: 1 })}
          className="min-h-11 rounded-md border border-spruce-700/40 px-3 font-normal" />
      </label>
      {users.isPending ? <Loading label={`Loading ${noun[1]}…`} /> : users.isError ? <ErrorState error={users.error} retry={() => users.refetch()} /> : users.data.total === 0 ? (
        <EmptyState title={view.search.trim() ? `No ${noun[1]} match “${view.search.trim()}”` : `No ${noun[1]} yet`} />
      ) : (
        <DataTable data={users.data.items} columns={columns} caption={who === 'staff' ? 'Staff' : 'Customers'} rowClassName={(u) => (u.active ? '' : 'text-ink-soft')} server={{
          sort: view.sort, dir: view.dir, page: users.data, noun,
          onSort: (sort, dir) => onView({ ...view, sort: sort as UserListQuery['sort'], dir, page: 1 }), onPage: (page) => onView({ ...view, page }),
        }} />
      )}
    </div>
  );
}

/** The last role change, with its undo button while the server still allows it. */
function RecentChange({ recent, onDone }: { recent: { change: RoleChange; name: string; until: number }; onDone: () => void }) {
  const undo = useUndoRoleChange();
  const toast = useToast();
  const [now, setNow] = useState(() => Date.now());
  const left = Math.max(0, Math.ceil((recent.until - now) / 1000));
  useEffect(() => {
    if (left === 0) return;
    const timer = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(timer);
  }, [left]);
  const { change, name } = recent;
  return (
    <Notice tone="good">
      <span className="flex flex-wrap items-center gap-3">
        <span>{name} is now {role(change.to)} (was {role(change.from)}).</span>
        {left > 0 ? (
          <>
            <Button type="button" variant="secondary" busy={undo.isPending}
              onClick={() => undo.mutate(change.id, {
                onSuccess: () => { toast(`${name} is ${role(change.from)} again`); onDone(); },
                onError: (e) => { toast(e.message, 'alarm'); onDone(); },
              })}>
              Undo
            </Button>
            <span className="text-sm text-ink-soft">{left} s left to undo</span>
          </>
        ) : null}
      </span>
    </Notice>
  );
}

export default function UsersPage() {
  const [who, setWho] = useState<Who>('staff');
  const [views, setViews] = useState<Record<Who, ListView>>({ staff: firstView, customers: firstView });
  const [roleChange, setRoleChange] = useState<{ person: UserRow; to: Role } | null>(null);
  const [deactivating, setDeactivating] = useState<UserRow | null>(null);
  const [recent, setRecent] = useState<{ change: RoleChange; name: string; until: number } | null>(null);
  const staffCount = useUsers({ pageSize: 1, staff: true }).data?.total;
  const customerCount = useUsers({ pageSize: 1, staff: false }).data?.total;
  const update = useUpdateUser();
  const toast = useToast();
  const me = useSession().data;
  const fmt = useFormatters();

  const columns = useMemo(() => {
    const moreFor = (u: UserRow): RowMenuItem[] => [
      ...(u.role === 'customer' && u.active ? [{ label: 'Give a staff role…', onSelect: () => setRoleChange({ person: u, to: 'assembler' as Role }) }] : []),
      u.active
        ? { label: 'Deactivate…', tone: 'danger' as const, onSelect: () => setDeactivating(u) }
        : { label: 'Reactivate', onSelect: () => update.mutate({ id: u.id, active: true }, { onSuccess: () => toast(`${u.name} can sign in again`), onError: (e) => toast(e.message, 'alarm') }) },
    ];
    const name: ColumnDef<UserRow, unknown> = { id: 'name', accessorKey: 'name', header: 'Name', cell: (c) => <span className="font-semibold">{String(c.getValue())}</span> };
    const email: ColumnDef<UserRow, unknown> = { id: 'email', accessorKey: 'email', header: 'E-mail', cell: (c) => <span className="break-all">{String(c.getValue())}</span> };
    const status: ColumnDef<UserRow, unknown> = { accessorKey: 'active', header: 'Status', enableSorting: false, cell: ({ row }) => (row.original.active ? 'Active' : 'Deactivated') };
    const more: ColumnDef<UserRow, unknown> = {
      id: 'actions', header: () => <span className="sr-only">More</span>, enableSorting: false,
      cell: ({ row }) => (row.original.id === me?.id ? <span className="text-sm text-ink-soft">you</span> : <RowMenu label={`More for ${row.original.name}`} items={moreFor(row.original)} />),
    };
    const staffRole: ColumnDef<UserRow, unknown> = {
      id: 'role', accessorKey: 'role', header: 'Role',
      cell: ({ row }) => (
        <select aria-label={`Role of ${row.original.name}`} value={row.original.role} disabled={row.original.id === me?.id || !row.original.active}
          className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2"
          onChange={(e) => setRoleChange({ person: row.original, to: e.target.value as Role })}>
          {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
        </select>
      ),
    };
    const joined: ColumnDef<UserRow, unknown> = { id: 'createdAt', accessorKey: 'created_at', header: 'Joined', cell: ({ getValue }) => <span className="whitespace-nowrap">{fmt.date(getValue() as string)}</span> };
    return { staff: [name, email, staffRole, status, more], customers: [name, email, joined, status, more] } satisfies Record<Who, ColumnDef<UserRow, unknown>[]>;
  }, [fmt, me?.id, toast, update]);

  const confirmRole = () => {
    if (!roleChange) return;
    const { person, to } = roleChange;
    update.mutate({ id: person.id, role: to, fromRole: person.role }, {
      onSuccess: ({ roleChange: change }) => {
        setRoleChange(null);
        if (change) setRecent({ change, name: person.name, until: Date.now() + change.undoSeconds * 1000 });
      },
      onError: (e) => { setRoleChange(null); toast(e.message, 'alarm'); },
    });
  };

  const tab = (id: Who, label: string, count: number | undefined) => (
    <button type="button" role="tab" id={`tab-${id}`} aria-selected={who === id} aria-controls={`panel-${id}`} tabIndex={who === id ? 0 : -1}
      onClick={() => setWho(id)}
      onKeyDown={(e) => { if (e.key === 'ArrowRight' || e.key === 'ArrowLeft') { const next = who === 'staff' ? 'customers' : 'staff'; setWho(next); document.getElementById(`tab-${next}`)?.focus(); } }}
      className={`min-h-11 rounded-t-md border-b-4 px-4 font-semibold ${who === id ? 'border-copper-600 text-spruce-900' : 'border-transparent text-ink-soft hover:text-spruce-900'}`}>
      {label}{count !== undefined ? ` (${fmt.count(count)})` : ''}
    </button>
  );

  const pending = roleChange;
  return (
    <>
      <PageHeader title="People & roles" />
      <div className="flex flex-col gap-6">
        {recent ? <RecentChange key={recent.change.id} recent={recent} onDone={() => setRecent(null)} /> : null}
        <div>
          <div role="tablist" aria-label="People" className="mb-4 flex gap-2 border-b border-spruce-700/20">
            {tab('staff', 'Staff', staffCount)}
            {tab('customers', 'Customers', customerCount)}
          </div>
          <div role="tabpanel" id={`panel-${who}`} aria-labelledby={`tab-${who}`}>
            <PeopleList key={who} who={who} view={views[who]} onView={(v) => setViews((all) => ({ ...all, [who]: v }))} columns={columns[who]} />
          </div>
        </div>
        <CreateUserForm />
      </div>

      <ConfirmDialog open={pending !== null} title={pending ? `Change ${pending.person.name}’s role?` : ''} busy={update.isPending}
        confirmLabel={pending ? `Make ${pending.person.name.split(' ')[0]} ${role(pending.to)}` : 'Change'} onConfirm={confirmRole} onCancel={() => setRoleChange(null)}>
        {pending ? (
          <div className="flex flex-col gap-3">
            <p className="text-lg"><strong>{ROLE_LABELS[pending.person.role]}</strong> → <strong>{ROLE_LABELS[pending.to]}</strong></p>
            {pending.person.role === 'customer' ? (
              <label className="flex flex-col gap-1 font-semibold">New role
                <select value={pending.to} onChange={(e) => setRoleChange({ ...pending, to: e.target.value as Role })} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2 font-normal">
                  {STAFF.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
                </select>
              </label>
            ) : null}
            <p>{ROLE_REACH[pending.to]} It applies at once, on their next click; you can undo it for a minute.</p>
          </div>
        ) : null}
      </ConfirmDialog>

      <ConfirmDialog open={deactivating !== null} tone="danger" title={deactivating ? `Deactivate ${deactivating.name}?` : ''} busy={update.isPending}
        confirmLabel="Deactivate" onCancel={() => setDeactivating(null)}
        onConfirm={() => {
          const person = deactivating!;
          update.mutate({ id: person.id, active: false }, {
            onSuccess: () => { setDeactivating(null); toast(`${person.name} is deactivated and signed out everywhere`); },
            onError: (e) => { setDeactivating(null); toast(e.message, 'alarm'); },
          });
        }}>
        <p>They are signed out everywhere at once and cannot sign in until someone reactivates them. Their orders and work stay on record.</p>
      </ConfirmDialog>
    </>
  );
}
