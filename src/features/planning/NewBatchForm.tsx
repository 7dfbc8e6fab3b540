import { useState } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { useNavigate } from 'react-router';
import { createBatchSchema } from '../../../shared/schemas/production';
import { Button } from '../../components/ui/Button';
import { Pager } from '../../components/ui/DataTable';
import { ErrorState, Loading, Notice } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useCandidates, useCreateBatch } from './api';

interface FormValues {
  revisionId: string;
  orderLineIds: string[];
  stock: Record<string, string>;
}

/** Plan a batch: a revision, the paid order lines to pull, and stock builds per option. */
export function NewBatchForm() {
  const create = useCreateBatch();
  const toast = useToast();
  const navigate = useNavigate();
  const fmt = useFormatters();
  const form = useForm<FormValues>({ defaultValues: { revisionId: '', orderLineIds: [], stock: {} } });
  const [problem, setProblem] = useState<string | null>(null);
  const revisionId = Number(useWatch({ control: form.control, name: 'revisionId' }));
  // The waiting lines come a page at a time, for the chosen revision's model; ticked lines stay
  // ticked across pages (the form keeps their ids).
  const [lines, setLines] = useState({ modelId: 0, page: 1 });
  const candidates = useCandidates(lines.modelId ? lines : { pageSize: 1 });

  if (candidates.isPending) return <Loading label="Loading models and waiting orders…" />;
  if (candidates.isError) return <ErrorState error={candidates.error} retry={() => candidates.refetch()} />;
  const revision = candidates.data.revisions.find((r) => r.id === revisionId);
  const page = candidates.data.orderLines;
  const waiting = page.items.filter((l) => l.modelId === revision?.modelId);
  const revisions = candidates.data.revisions;

  const onSubmit = form.handleSubmit((values) => {
    // The same schema the server applies; stock fields left at 0 are not builds.
    const parsed = createBatchSchema.safeParse({
      revisionId: values.revisionId,
      orderLineIds: values.orderLineIds,
      stockBuilds: Object.entries(values.stock).filter(([, q]) => Number(q) > 0).map(([optionId, quantity]) => ({ optionId, quantity })),
    });
    if (!parsed.success) {
      setProblem(parsed.error.issues.map((i) => i.message).join('; '));
      return;
    }
    setProblem(null);
    create.mutate(parsed.data, {
      onSuccess: (b) => {
        toast(`Batch planned: review its parts before release`);
        navigate(`/planning/${b.id}`);
      },
      onError: (e) => setProblem(e.message),
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-4 rounded-lg bg-white p-6 shadow-sm">
      <h2 className="text-xl font-bold text-spruce-900">Plan a new batch</h2>
      <div className="flex flex-col gap-1">
        <label htmlFor="batch-revision" className="font-semibold">Model revision</label>
        <select id="batch-revision" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3" {...form.register('revisionId', {
          onChange: (e: { target: { value: string } }) => setLines({ modelId: revisions.find((r) => r.id === Number(e.target.value))?.modelId ?? 0, page: 1 }),
        })}>
          <option value="">Choose a model revision…</option>
          {candidates.data.revisions.map((r) => (
            <option key={r.id} value={r.id}>{r.modelName} · rev. {r.number}{r.label ? ` (${r.label})` : ''}{r.active ? ' · current' : ''}</option>
          ))}
        </select>
      </div>
      {revision ? (
        <>
          <fieldset className="grid gap-2">
            <legend className="mb-1 font-semibold">Paid orders waiting for this model</legend>
            {candidates.isPlaceholderData ? <Loading label="Loading waiting orders…" /> : waiting.length === 0 ? <p className="text-ink-soft">No paid orders are waiting for {revision.modelName}.</p> : waiting.map((l) => (
              <label key={l.id} className="flex min-h-11 items-center gap-3 rounded-md border border-spruce-700/20 px-3">
                <input type="checkbox" value={l.id} className="size-5" {...form.register('orderLineIds')} />
                <span><strong>{l.orderNumber}</strong> · {l.customerName} · {l.quantity} × {l.description}{l.dueAt ? ` · due ${fmt.date(l.dueAt)}` : ''}</span>
              </label>
            ))}
            {waiting.length > 0 && page.total > page.pageSize ? (
              <Pager label="Paid orders waiting" listing={{ sort: 'dueAt', dir: 'asc', onSort: () => undefined, page, onPage: (p) => setLines((v) => ({ ...v, page: p })), noun: ['order line', 'order lines'] }} />
            ) : null}
          </fieldset>
          <fieldset className="grid gap-2 sm:grid-cols-2">
            <legend className="mb-1 font-semibold">Build for finished stock (units per option)</legend>
            {revision.options.map((o) => (
              <label key={o.id} className="flex min-h-11 items-center justify-between gap-3 rounded-md border border-spruce-700/20 px-3">
                <span>{o.name} <span className="font-mono text-sm text-ink-soft">{o.code}</span></span>
                <input type="number" min={0} max={500} inputMode="numeric" aria-label={`Stock units of ${o.name}`} defaultValue={0} className="min-h-11 w-24 rounded-md border border-spruce-700/40 px-2" {...form.register(`stock.${o.id}`)} />
              </label>
            ))}
          </fieldset>
        </>
      ) : null}
      {problem ? <Notice tone="alarm">{problem}</Notice> : null}
      <div><Button type="submit" busy={create.isPending} disabled={!revision}>Plan batch</Button></div>
    </form>
  );
}
