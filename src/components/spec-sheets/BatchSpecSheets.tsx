import { Button } from '../ui/Button';
import { Ident } from '../ui/Ident';
import { ErrorState, Loading, Notice } from '../ui/states';
import { useToast } from '../ui/toast';
import { archiveUrl, useBatchJob, useStartBatchSheets, type SheetJob } from './api';

function Progress({ job }: { job: SheetJob }) {
  const percent = job.total > 0 ? Math.round((job.done / job.total) * 100) : 0;
  const words = job.state === 'queued' ? 'Waiting for a worker…' : `${job.done} of ${job.total} sheets made`;
  return (
    <div className="grid gap-1">
      <div
        role="progressbar" aria-label="Spec sheets made" aria-valuemin={0} aria-valuemax={job.total} aria-valuenow={job.done}
        aria-valuetext={words} className="h-4 overflow-hidden rounded-full bg-spruce-100 ring-1 ring-spruce-700/30"
      >
        <div className="h-full bg-copper-600 transition-[width] duration-300" style={{ width: `${percent}%` }} />
      </div>
      <p className="text-sm text-ink-soft">{words}</p>
    </div>
  );
}

/** "Make all spec sheets" for a batch: starts the background job, shows its progress (also after a reload), then the archive. */
export function BatchSpecSheets({ batchId, label }: { batchId: number; label: string }) {
  const job = useBatchJob(batchId);
  const start = useStartBatchSheets(batchId);
  const toast = useToast();
  if (job.isPending) return <Loading label="Checking for spec sheet jobs…" />;
  if (job.isError) return <ErrorState error={job.error} retry={() => void job.refetch()} />;
  const current = job.data;
  const working = current?.state === 'queued' || current?.state === 'running';

  const make = () => start.mutate(undefined, {
    onSuccess: (j) => toast(`Making ${j.total} spec sheets for batch ${label}`),
    onError: (e) => toast(e instanceof Error ? e.message : 'The spec sheets could not be started', 'alarm'),
  });

  return (
    <section aria-labelledby={`sheets-${batchId}`} className="grid gap-3 rounded-lg border border-spruce-700/20 bg-white p-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id={`sheets-${batchId}`} className="text-lg font-semibold text-spruce-900">Spec sheets</h2>
        <Button onClick={make} busy={start.isPending} disabled={working}>
          {working ? 'Making spec sheets…' : current ? 'Make all spec sheets again' : 'Make all spec sheets'}
        </Button>
      </div>
      {!current ? <p className="text-ink-soft">One PDF per unit, in one archive. Passed units keep the sheet made now.</p> : null}
      {current && working ? <Progress job={current} /> : null}
      {current?.state === 'finished' ? (
        <div className="grid gap-2">
          <Notice tone={current.failures.length ? 'alarm' : 'good'}>
            {current.failures.length
              ? `${current.total - current.failures.length} of ${current.total} sheets made; ${current.failures.length} could not be made (listed below).`
              : `All ${current.total} sheets are made.`}
          </Notice>
          <a href={archiveUrl(current.id)} download className="inline-flex min-h-11 w-fit items-center gap-2 rounded-md bg-copper-600 px-4 py-2 font-semibold text-white hover:bg-copper-700">
            <span aria-hidden>⤓</span> Download the archive (.zip)
          </a>
          {current.failures.length ? (
            <ul className="list-disc pl-6 text-sm text-alarm-700">
              {current.failures.map((f) => <li key={f.serial}><Ident mono>{f.serial}</Ident>: {f.reason}</li>)}
            </ul>
          ) : null}
        </div>
      ) : null}
      {current?.state === 'failed' ? <Notice tone="alarm">The archive could not be made: {current.error ?? 'unknown error'}. Try again.</Notice> : null}
    </section>
  );
}
