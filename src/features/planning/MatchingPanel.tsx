import type { ColumnDef } from '@tanstack/react-table';
import { shopFormat } from '../../lib/format';
import { useMemo, useState } from 'react';
import type { H2Summary } from '../../../shared/matching/batch';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { Notice } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import type { MatchProposal } from '../trays/api';
import { useAcceptMatching, useProposeMatching, type BatchDetail } from './api';

type PlannedUnit = MatchProposal['units'][number];
const db = (v: number) => `${shopFormat().number(v, 1)} dBc`;
const range = (s: H2Summary) => `mean ${db(s.meanDbc)}, ${shopFormat().number(s.minDbc, 1)} to ${shopFormat().number(s.maxDbc, 1)} dBc`;

/** What matching gains for one option, in words: predicted H2 of the matched units against random pairing. */
function gainWords(o: MatchProposal['options'][number]) {
  if (!o.matchedH2 || !o.randomH2) return null;
  if (o.method === 'pairs' || o.method === 'strings') {
    return `Predicted H2 matched: ${range(o.matchedH2)}; random pairs of the same trays: ${range(o.randomH2)} (${shopFormat().number(o.randomH2.meanDbc - o.matchedH2.meanDbc, 1)} dB more even harmonic).`;
  }
  return `Predicted H2 off the option’s nominal ${db(o.nominalH2Dbc)}: matched ${shopFormat().number(o.matchedH2.meanOffDb, 2)} dB on average (spread ${shopFormat().number(o.matchedH2.spreadDb, 2)} dB); random pairing ${shopFormat().number(o.randomH2.meanOffDb, 2)} dB (spread ${shopFormat().number(o.randomH2.spreadDb, 2)} dB).`;
}

/** Propose which tray slots go into which unit, see the gain, accept it into the kit list and checklists. */
export function MatchingPanel({ detail }: { detail: BatchDetail }) {
  const propose = useProposeMatching(detail.batch.id);
  const accept = useAcceptMatching(detail.batch.id);
  const toast = useToast();
  const [proposal, setProposal] = useState<MatchProposal | null>(null);
  const columns = useMemo<ColumnDef<PlannedUnit, unknown>[]>(() => [
    { accessorKey: 'serial', header: 'Unit', cell: ({ row }) => <span className="font-mono text-sm">{row.original.serial}</span> },
    { accessorKey: 'optionCode', header: 'Option' },
    { id: 'slots', header: 'Take', enableSorting: false, cell: ({ row }) => row.original.slots.map((s) => `${s.label} (${s.side === 'positive' ? '+' : '−'} ${shopFormat().number(s.vf, 4)} V)`).join(', ') },
    { accessorKey: 'mismatchMv', header: 'Mismatch', cell: ({ row }) => `${shopFormat().number(row.original.mismatchMv, 1)} mV` },
    { accessorKey: 'h2Dbc', header: 'Predicted H2', cell: ({ row }) => db(row.original.h2Dbc) },
  ], []);
  const run = () => propose.mutate({}, { onSuccess: setProposal, onError: (e) => toast(e.message, 'alarm') });
  const unmatchedUnits = detail.units.filter((u) => ['waiting', 'building', 'rework'].includes(u.state) && !u.slots.length).length;
  return (
    <section aria-labelledby="matching-heading" className="grid gap-3 rounded-lg bg-white p-6 shadow-sm">
      <h2 id="matching-heading" className="text-xl font-bold text-spruce-900">Clipping devices from trays</h2>
      <p className="text-ink-soft">
        Kneepoint picks measured devices from the trays: the closest pairs for symmetric options, and for uneven options the pairs whose predicted H2 is nearest the option’s own.
        {' '}{unmatchedUnits} unit{unmatchedUnits === 1 ? '' : 's'} still without devices.
      </p>
      <div><Button variant="secondary" busy={propose.isPending} disabled={!unmatchedUnits} onClick={run}>Propose matching</Button></div>
      {proposal ? (
        <div className="grid gap-3">
          {proposal.options.map((o) => (
            <div key={o.optionId} className="rounded-md border border-spruce-700/20 p-3">
              <p className="font-semibold">{o.optionName} <span className="font-mono text-sm">{o.optionCode}</span>: {o.matched} of {o.units} unit{o.units === 1 ? '' : 's'} matched</p>
              <p className="text-sm text-ink-soft">{o.note}</p>
              {gainWords(o) ? <p>{gainWords(o)}</p> : null}
            </div>
          ))}
          {proposal.units.length ? <DataTable data={proposal.units} columns={columns} caption="Proposed devices per unit" /> : <Notice tone="alarm">No unit can be matched from the trays’ free slots.</Notice>}
          {proposal.unmatched.length ? (
            <Notice tone="alarm">Not matched: {proposal.unmatched.map((u) => `${u.serial} (${u.reason})`).join('; ')}</Notice>
          ) : null}
          <p><strong>Left on the trays:</strong> {proposal.leftovers.length ? proposal.leftovers.map((l) => l.label).join(', ') : 'nothing'}</p>
          <div className="flex flex-wrap gap-2">
            <Button disabled={!proposal.units.length} busy={accept.isPending} onClick={() => accept.mutate({
              units: proposal.units.map((u) => ({ unitId: u.unitId, slots: u.slots.map((s) => ({ optionDeviceId: s.optionDeviceId, slotId: s.slotId })) })),
            }, {
              onSuccess: (r) => { toast(`Devices matched for ${r.matched} unit${r.matched === 1 ? '' : 's'}: the kit list and checklists name their slots`); setProposal(null); },
              onError: (e) => toast(e.message, 'alarm'),
            })}>Accept matching</Button>
            <Button variant="quiet" onClick={() => setProposal(null)}>Discard proposal</Button>
          </div>
        </div>
      ) : null}
    </section>
  );
}
