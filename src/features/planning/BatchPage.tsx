import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { BATCH_STATE_LABELS } from '../../../shared/production/states';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { BatchSpecSheets } from '../../components/spec-sheets';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useBatch, useCancelBatch, useKitBatch, useReleaseBatch, useReserveStock, type BatchDetail } from './api';
import { MatchingPanel } from './MatchingPanel';
import { AssignPanel } from './AssignPanel';
import { RequirementsTable } from './RequirementsTable';
import { printUrls } from '../shipping/api';

function ReleasePanel({ detail }: { detail: BatchDetail }) {
  const release = useReleaseBatch(detail.batch.id);
  const toast = useToast();
  const shortages = detail.requirements.filter((r) => r.shortage > 0);
  const [startDate, setStartDate] = useState(detail.earliestStart.date);
  const [reason, setReason] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <section aria-labelledby="release-heading" className="grid gap-3 rounded-lg bg-white p-6 shadow-sm">
      <h2 id="release-heading" className="text-xl font-bold text-spruce-900">Release to the bench</h2>
      <p className="text-ink-soft">Release freezes revision {detail.batch.revisionNumber}, creates the serial-numbered units and tells each customer when their pedal should ship.</p>
      {shortages.length ? (
        <Notice tone="alarm">{shortages.length} part{shortages.length === 1 ? ' is' : 's are'} short. Earliest start {detail.earliestStart.date} (waiting on {detail.earliestStart.waitingOn}). Order them, or give a reason to release anyway.</Notice>
      ) : <Notice tone="good">Every part is covered by free stock.</Notice>}
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Building starts on" type="date" value={startDate} onChange={(e) => setStartDate(e.target.value)} />
        {shortages.length ? <TextField label="Reason to release with shortages" value={reason} onChange={(e) => setReason(e.target.value)} hint="Kept with the batch" /> : null}
      </div>
      {problem ? <Notice tone="alarm">{problem}</Notice> : null}
      <div>
        <Button
          busy={release.isPending}
          onClick={() => release.mutate({ startDate, overrideReason: reason || undefined }, {
            onSuccess: (r) => {
              setProblem(null);
              toast(r.state === 'releasing'
                ? `Releasing: ${r.units} units are being created in the background; customers are told their ship date once all exist`
                : `Released: ${r.units} unit${r.units === 1 ? '' : 's'} created, ${r.orders} customer${r.orders === 1 ? '' : 's'} told their ship date`);
            },
            onError: (e) => setProblem(e.message),
          })}
        >
          Release batch
        </Button>
      </div>
    </section>
  );
}

/** A big release's progress: the job makes the units chunk by chunk; the page polls while it runs. */
function ReleaseProgress({ release }: { release: NonNullable<BatchDetail['release']> }) {
  const percent = release.total > 0 ? Math.round((release.done / release.total) * 100) : 0;
  const words = `${release.done} of ${release.total} units created`;
  return (
    <section aria-labelledby="releasing-heading" className="grid gap-2 rounded-lg bg-white p-6 shadow-sm">
      <h2 id="releasing-heading" className="text-xl font-bold text-spruce-900">Creating the units</h2>
      <div role="progressbar" aria-label="Units created" aria-valuemin={0} aria-valuemax={release.total} aria-valuenow={release.done} aria-valuetext={words}
        className="h-4 overflow-hidden rounded-full bg-spruce-100 ring-1 ring-spruce-700/30">
        <div className="h-full bg-copper-600 transition-[width] duration-300" style={{ width: `${percent}%` }} />
      </div>
      <p className="text-sm text-ink-soft">{words}. Kitting and assignment open once every unit exists.</p>
      {release.error ? <Notice tone="alarm">The last attempt stopped: {release.error}. It is tried again within a minute.</Notice> : null}
    </section>
  );
}

function KittingPanel({ detail }: { detail: BatchDetail }) {
  const reserve = useReserveStock(detail.batch.id);
  const kit = useKitBatch(detail.batch.id);
  const toast = useToast();
  const open = detail.units.filter((u) => u.state !== 'cancelled');
  const kitted = open.filter((u) => u.kitted).length;
  return (
    <section aria-labelledby="kitting-heading" className="grid gap-3 rounded-lg bg-white p-6 shadow-sm">
      <h2 id="kitting-heading" className="text-xl font-bold text-spruce-900">Kitting</h2>
      <p>{kitted} of {open.length} units kitted.</p>
      {open.some((u) => u.slots.length) ? (
        <div>
          <h3 className="font-bold">Kit list: clipping devices from trays</h3>
          <ul className="grid gap-1 sm:grid-cols-2">
            {open.filter((u) => u.slots.length).map((u) => <li key={u.id}><span className="font-mono text-sm">{u.serial}</span>: take <strong className="font-mono">{u.slots.join(' and ')}</strong></li>)}
          </ul>
        </div>
      ) : null}
      <div className="flex flex-wrap gap-2">
        <Button variant="secondary" busy={reserve.isPending} onClick={() => reserve.mutate(undefined, {
          onSuccess: (r) => toast(r.stillShort ? `Held ${r.reserved} parts for the batch; ${r.stillShort} still short` : `Held ${r.reserved} parts for the batch: nothing short`),
          onError: (e) => toast(e.message, 'alarm'),
        })}>Hold stock for batch</Button>
        <Button busy={kit.isPending} disabled={kitted === open.length} onClick={() => kit.mutate(undefined, {
          onSuccess: (r) => toast(r.notKitted ? `Kitted ${r.kitted} of ${r.kitted + r.notKitted} units; ${r.notKitted} wait for parts (${r.firstProblem})` : `Kitted ${r.kitted} unit${r.kitted === 1 ? '' : 's'}`, r.notKitted ? 'alarm' : undefined),
          onError: (e) => toast(e.message, 'alarm'),
        })}>Kit units</Button>
      </div>
    </section>
  );
}

export default function BatchPage() {
  const id = Number(useParams().id);
  const batch = useBatch(id);
  const cancel = useCancelBatch(id);
  const toast = useToast();
  const fmt = useFormatters();
  if (batch.isPending) return <Loading />;
  if (batch.isError) return <ErrorState error={batch.error} retry={() => batch.refetch()} />;
  const d = batch.data;
  const released = !['draft', 'releasing', 'cancelled'].includes(d.batch.state);
  return (
    <>
      <PageHeader title={`Batch ${d.batch.label}`}>
        <a className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold" href={`/api/batches/${id}/purchase-list.csv`}>Purchase list (CSV)</a>
        {released ? (
          <a className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold" href={printUrls.serialLabels(id)} target="_blank" rel="noreferrer">Serial labels (PDF)</a>
        ) : null}
        {['draft', 'released'].includes(d.batch.state) ? (
          <ConfirmButton label="Cancel batch" question={`Cancel batch ${d.batch.label}? Its units are cancelled and held stock goes back.`} confirmLabel="Cancel the batch"
            busy={cancel.isPending} onConfirm={() => cancel.mutate('cancelled by the planner', { onSuccess: () => toast(`Batch ${d.batch.label} cancelled`), onError: (e) => toast(e.message, 'alarm') })} />
        ) : null}
      </PageHeader>
      <p className="mb-6 text-lg">
        {d.batch.modelName} · revision {d.batch.revisionNumber} · <strong>{BATCH_STATE_LABELS[d.batch.state]}</strong>
        {d.batch.releasedAt ? ` · released ${fmt.dateTime(d.batch.releasedAt)}` : ''}
        {d.batch.shortageOverrideReason ? ` · released short: “${d.batch.shortageOverrideReason}”` : ''}
        {' · '}<Link to="/planning" className="underline">all batches</Link>
      </p>
      <div className="grid gap-8">
        <section aria-labelledby="lines-heading">
          <h2 id="lines-heading" className="mb-2 text-xl font-bold text-spruce-900">What it builds</h2>
          <ul className="grid gap-1">
            {d.lines.map((l) => <li key={l.id}>{l.quantity} × {l.optionName} <span className="font-mono text-sm">{l.optionCode}</span> — {l.orderNumber ? `order ${l.orderNumber}${l.dueAt ? `, due ${fmt.date(l.dueAt)}` : ''}` : 'for finished stock'}</li>)}
          </ul>
        </section>
        <section aria-labelledby="parts-heading">
          <h2 id="parts-heading" className="mb-2 text-xl font-bold text-spruce-900">Parts against stock</h2>
          {d.requirements.length ? <RequirementsTable rows={d.requirements} released={released} /> : <p className="text-ink-soft">Every unit is kitted: nothing left to draw from stock.</p>}
        </section>
        {d.batch.state === 'draft' ? <ReleasePanel detail={d} /> : null}
        {d.batch.state === 'releasing' && d.release ? <ReleaseProgress release={d.release} /> : null}
        {released ? <KittingPanel detail={d} /> : null}
        {['released', 'on_bench'].includes(d.batch.state) ? <MatchingPanel detail={d} /> : null}
        {released ? <AssignPanel detail={d} /> : null}
        {released ? <BatchSpecSheets batchId={id} label={d.batch.label} /> : null}
      </div>
    </>
  );
}
