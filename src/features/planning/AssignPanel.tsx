import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { UNIT_STATE_LABELS } from '../../../shared/production/states';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { DataTable } from '../../components/ui/DataTable';
import { useToast } from '../../components/ui/toast';
import { useApplyAssignments, useAssemblers, useCancelUnit, useProposePlan, type BatchDetail, type BatchUnit, type PlanProposal } from './api';
import { PlanEditor } from './PlanEditor';

/** Assign builds by hand (select several units, one assembler and day) or from a proposed plan. */
export function AssignPanel({ detail }: { detail: BatchDetail }) {
  const assemblers = useAssemblers();
  const apply = useApplyAssignments(detail.batch.id);
  const propose = useProposePlan(detail.batch.id);
  const cancelUnit = useCancelUnit();
  const toast = useToast();
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [assemblerId, setAssemblerId] = useState('');
  const [date, setDate] = useState(detail.batch.plannedStart?.slice(0, 10) ?? new Date().toISOString().slice(0, 10));
  const [proposal, setProposal] = useState<PlanProposal | null>(null);
  const assignable = detail.units.filter((u) => u.state === 'waiting' || u.state === 'rework');

  const toggle = (id: number) => setSelected((s) => { const n = new Set(s); if (n.has(id)) n.delete(id); else n.add(id); return n; });
  const columns = useMemo<ColumnDef<BatchUnit, unknown>[]>(() => [
    {
      id: 'pick', enableSorting: false, header: () => <span className="sr-only">Select</span>,
      cell: ({ row }) => (['waiting', 'rework'].includes(row.original.state)
        ? <label className="inline-flex size-11 items-center justify-center"><input type="checkbox" className="size-5" aria-label={`Select ${row.original.serial}`} checked={selected.has(row.original.id)} onChange={() => toggle(row.original.id)} /></label>
        : null),
    },
    { accessorKey: 'serial', header: 'Serial', cell: ({ row }) => <span className="font-mono text-sm">{row.original.serial}</span> },
    { accessorKey: 'optionCode', header: 'Option' },
    { id: 'slots', header: 'Devices from trays', enableSorting: false, cell: ({ row }) => (row.original.slots.length ? <span className="font-mono text-sm">{row.original.slots.join(' + ')}</span> : '—') },
    { accessorKey: 'orderNumber', header: 'For', cell: ({ row }) => row.original.orderNumber ?? 'stock' },
    { accessorKey: 'assemblerName', header: 'Builder', cell: ({ row }) => row.original.assemblerName ?? '—' },
    { accessorKey: 'plannedDate', header: 'Planned day', cell: ({ row }) => row.original.plannedDate ?? '—' },
    { accessorKey: 'state', header: 'State', cell: ({ row }) => `${UNIT_STATE_LABELS[row.original.state]}${row.original.kitted ? '' : ' · not kitted'}` },
    {
      id: 'cancel', enableSorting: false, header: () => <span className="sr-only">Cancel</span>,
      cell: ({ row }) => (['waiting', 'building'].includes(row.original.state) ? (
        <ConfirmButton variant="secondary" label="Cancel unit" question={`Cancel ${row.original.serial}? Its serial is never reused; parts held for it go back to stock if it was not kitted.`} confirmLabel="Cancel the unit"
          onConfirm={() => cancelUnit.mutate({ unitId: row.original.id, reason: 'cancelled by the planner' }, { onSuccess: () => toast(`${row.original.serial} cancelled`), onError: (e) => toast(e.message, 'alarm') })} />
      ) : null),
    },
  ], [selected, cancelUnit, toast]);

  return (
    <div className="grid gap-4">
      <div className="flex flex-wrap items-end gap-3">
        <Button variant="secondary" busy={propose.isPending} disabled={!assignable.length} onClick={() => propose.mutate(detail.batch.plannedStart?.slice(0, 10), {
          onSuccess: (p) => { setProposal(p); toast(`Proposed a plan for ${p.builds.length} unit${p.builds.length === 1 ? '' : 's'}${p.unassignable.length ? `; ${p.unassignable.length} need skills nobody has` : ''}`); },
          onError: (e) => toast(e.message, 'alarm'),
        })}>Propose a balanced plan</Button>
        <span className="text-ink-soft">or pick units below and assign them by hand:</span>
        <div className="flex flex-col gap-1">
          <label htmlFor="hand-assembler" className="font-semibold">Assembler</label>
          <select id="hand-assembler" value={assemblerId} onChange={(e) => setAssemblerId(e.target.value)} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3">
            <option value="">Choose…</option>
            {(assemblers.data ?? []).map((a) => <option key={a.id} value={a.id}>{a.name} · {a.dailyCapacityMinutes} min/day</option>)}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="hand-date" className="font-semibold">Day</label>
          <input id="hand-date" type="date" value={date} onChange={(e) => setDate(e.target.value)} className="min-h-11 rounded-md border border-spruce-700/40 px-3" />
        </div>
        <Button disabled={!selected.size || !assemblerId} busy={apply.isPending} onClick={() => apply.mutate({ builds: [...selected].map((unitId) => ({ unitId, assemblerId: Number(assemblerId), date })) }, {
          onSuccess: (r) => { setSelected(new Set()); toast(`Assigned ${r.assigned} unit${r.assigned === 1 ? '' : 's'}${r.late.length ? `; ${r.late.length} after their due date` : ''}`); },
          onError: (e) => toast(e.message, 'alarm'),
        })}>Assign selected ({selected.size})</Button>
      </div>
      {proposal ? <PlanEditor proposal={proposal} units={detail.units} busy={apply.isPending} onCancel={() => setProposal(null)} onApply={(builds) => apply.mutate({ builds }, {
        onSuccess: (r) => { setProposal(null); toast(`Plan applied: ${r.assigned} build${r.assigned === 1 ? '' : 's'} assigned${r.late.length ? `, ${r.late.length} late` : ''}`); },
        onError: (e) => toast(e.message, 'alarm'),
      })} /> : null}
      <DataTable data={detail.units} columns={columns} caption="Units of this batch" />
    </div>
  );
}
