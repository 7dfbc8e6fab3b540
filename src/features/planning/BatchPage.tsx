import { Link, useParams } from 'react-router';
import { BATCH_STATE_LABELS } from '../../../shared/production/states';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { Section } from '../../components/ui/Section';
import { BatchSpecSheets } from '../../components/spec-sheets';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useBatch, useCancelBatch, useKitBatch, useReserveStock, type BatchDetail } from './api';
import { MatchingPanel } from './MatchingPanel';
import { AssignPanel } from './AssignPanel';
import { nextAction } from './batch-next';
import { BatchLines } from './BatchLines';
import { BatchParts, LONG_LIST } from './BatchParts';
import { ReleasePanel } from './ReleasePanel';
import { printUrls } from '../shipping/api';

/** A big release's progress: the job makes the units chunk by chunk; the page polls while it runs. */
function ReleaseProgress({ release }: { release: NonNullable<BatchDetail['release']> }) {
  const percent = release.total > 0 ? Math.round((release.done / release.total) * 100) : 0;
  const words = `${release.done} of ${release.total} units created`;
  return (
    <div className="grid gap-2">
      <div role="progressbar" aria-label="Units created" aria-valuemin={0} aria-valuemax={release.total} aria-valuenow={release.done} aria-valuetext={words}
        className="h-4 overflow-hidden rounded-full bg-spruce-100 ring-1 ring-spruce-700/30">
        <div className="h-full bg-copper-600 transition-[width] duration-300" style={{ width: `${percent}%` }} />
      </div>
      <p className="text-sm text-ink-soft">{words}. Kitting and assignment open once every unit exists.</p>
      {release.error ? <Notice tone="alarm">The last attempt stopped: {release.error}. It is tried again within a minute.</Notice> : null}
    </div>
  );
}

function KittingPanel({ detail }: { detail: BatchDetail }) {
  const reserve = useReserveStock(detail.batch.id);
  const kit = useKitBatch(detail.batch.id);
  const toast = useToast();
  const open = detail.units.filter((u) => u.state !== 'cancelled');
  const kitted = open.filter((u) => u.kitted).length;
  return (
    <div className="grid gap-3">
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
    </div>
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
  const next = nextAction(d);
  const open = d.units.filter((u) => u.state !== 'cancelled');
  const units = d.lines.reduce((n, l) => n + l.quantity, 0);
  return (
    <>
      <PageHeader title={`Batch ${d.batch.label}`}>
        <Link to="/planning" className="inline-flex min-h-11 items-center underline">All batches</Link>
        {released ? (
          <a className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold" href={printUrls.serialLabels(id)} target="_blank" rel="noreferrer">Serial labels (PDF)</a>
        ) : null}
        {['draft', 'released'].includes(d.batch.state) ? (
          <ConfirmButton label="Cancel batch" question={`Cancel batch ${d.batch.label}? Its units are cancelled and held stock goes back.`} confirmLabel="Cancel the batch"
            busy={cancel.isPending} onConfirm={() => cancel.mutate('cancelled by the planner', { onSuccess: () => toast(`Batch ${d.batch.label} cancelled`), onError: (e) => toast(e.message, 'alarm') })} />
        ) : null}
      </PageHeader>
      {/* The batch at a glance: its state and the one thing to do next, with a button to where it is done. */}
      <section aria-label="Batch status" className="mb-6 grid gap-2 rounded-lg border-l-8 border-copper-600 bg-white p-4 shadow-sm">
        <p className="text-lg">
          <strong className="mr-2 rounded bg-spruce-900 px-2 py-0.5 text-white">{BATCH_STATE_LABELS[d.batch.state]}</strong>
          {d.batch.modelName} · revision {d.batch.revisionNumber} · {units} unit{units === 1 ? '' : 's'}
          {d.batch.releasedAt ? ` · released ${fmt.dateTime(d.batch.releasedAt)}` : ''}
          {d.batch.shortageOverrideReason ? ` · released short: “${d.batch.shortageOverrideReason}”` : ''}
        </p>
        <div className="flex flex-wrap items-center justify-between gap-3">
          <p className="text-lg font-semibold"><span className="text-copper-700">Next:</span> {next.text}</p>
          {next.section ? <a href={`#${next.section}`} className="inline-flex min-h-11 items-center rounded-md bg-copper-600 px-4 font-semibold text-white hover:bg-copper-700">{next.go}</a> : null}
        </div>
      </section>
      <div className="grid gap-4">
        <BatchParts detail={d} released={released} />
        <Section id="lines" title="What it builds" summary={`${d.lines.length} line${d.lines.length === 1 ? '' : 's'}, ${units} unit${units === 1 ? '' : 's'}${d.customersToMail.length ? ` for ${d.customersToMail.length} customer${d.customersToMail.length === 1 ? '' : 's'}` : ''}`}
          defaultOpen={d.batch.state === 'draft' || d.lines.length <= LONG_LIST}>
          <BatchLines detail={d} />
        </Section>
        {d.batch.state === 'draft' ? <Section id="release" title="Release to the bench"><ReleasePanel detail={d} /></Section> : null}
        {d.batch.state === 'releasing' && d.release ? <Section id="releasing" title="Creating the units"><ReleaseProgress release={d.release} /></Section> : null}
        {released ? <Section id="kitting" title="Kitting" summary={`${open.filter((u) => u.kitted).length} of ${open.length} units kitted`}><KittingPanel detail={d} /></Section> : null}
        {['released', 'on_bench'].includes(d.batch.state) ? <MatchingPanel detail={d} /> : null}
        {released ? (
          <Section id="assign" title="Who builds what, and when" defaultOpen={open.length <= LONG_LIST || open.some((u) => u.assemblerId === null)}
            summary={`${open.filter((u) => u.assemblerId !== null).length} of ${open.length} units assigned`}>
            <AssignPanel detail={d} />
          </Section>
        ) : null}
        {released ? <BatchSpecSheets batchId={id} label={d.batch.label} /> : null}
      </div>
    </>
  );
}
