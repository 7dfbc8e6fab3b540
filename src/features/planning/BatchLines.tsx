import { useState } from 'react';
import { addBatchLinesSchema } from '../../../shared/schemas/production';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useAddBatchLines, useCandidates, useRemoveBatchLine, type BatchDetail } from './api';

/** What the batch builds; while it is being planned, order lines and stock builds can be added and removed. */
export function BatchLines({ detail }: { detail: BatchDetail }) {
  const fmt = useFormatters();
  const toast = useToast();
  const remove = useRemoveBatchLine(detail.batch.id);
  const draft = detail.batch.state === 'draft';
  return (
    <div className="grid gap-4">
      <ul className="grid gap-1">
        {detail.lines.map((l) => (
          <li key={l.id} className="flex flex-wrap items-center justify-between gap-2 border-b border-spruce-700/10 py-1">
            <span>
              {l.quantity} × {l.optionName} <span className="font-mono text-sm">{l.optionCode}</span> —{' '}
              {l.orderNumber ? <>order <span className="whitespace-nowrap font-mono">{l.orderNumber}</span>{l.customerName ? ` for ${l.customerName}` : ''}{l.dueAt ? `, due ${fmt.date(l.dueAt)}` : ''}</> : 'for finished stock'}
            </span>
            {draft ? (
              <Button variant="secondary" busy={remove.isPending && remove.variables === l.id} disabled={detail.lines.length === 1}
                aria-label={`Remove ${l.orderNumber ? `order ${l.orderNumber}` : `stock build of ${l.optionName}`}`}
                title={detail.lines.length === 1 ? 'The last line stays: cancel the batch instead' : undefined}
                onClick={() => remove.mutate(l.id, {
                  onSuccess: () => toast(l.orderNumber ? `Order ${l.orderNumber} taken out of the batch; it waits for planning again` : `Stock build of ${l.quantity} × ${l.optionName} taken out`),
                  onError: (e) => toast(e.message, 'alarm'),
                })}>Remove</Button>
            ) : null}
          </li>
        ))}
      </ul>
      {draft ? <AddLines detail={detail} /> : <p className="text-sm text-ink-soft">Released batches keep what they build; cancel single units instead.</p>}
    </div>
  );
}

/** Adds paid order lines of the same model and stock builds to a batch being planned. */
function AddLines({ detail }: { detail: BatchDetail }) {
  // The first hundred waiting lines of this model, earliest due first (the list is paged on the server).
  const candidates = useCandidates({ modelId: detail.batch.modelId, pageSize: 100 });
  const add = useAddBatchLines(detail.batch.id);
  const toast = useToast();
  const [lineIds, setLineIds] = useState<number[]>([]);
  const [optionId, setOptionId] = useState('');
  const [quantity, setQuantity] = useState('1');
  const [problem, setProblem] = useState<string | null>(null);
  if (candidates.isPending) return <p role="status" className="text-ink-soft">Loading waiting orders…</p>;
  if (candidates.isError) return <Notice tone="alarm">Waiting orders could not be loaded: {candidates.error.message}</Notice>;
  const waiting = candidates.data.orderLines.items;
  const more = candidates.data.orderLines.total - waiting.length;
  const options = candidates.data.revisions.find((r) => r.modelId === detail.batch.modelId)?.options ?? [];

  const submit = () => {
    const parsed = addBatchLinesSchema.safeParse({ orderLineIds: lineIds, stockBuilds: optionId ? [{ optionId, quantity }] : [] });
    if (!parsed.success) { setProblem(parsed.error.issues.map((i) => i.message).join('; ')); return; }
    setProblem(null);
    add.mutate(parsed.data, {
      onSuccess: (r) => { setLineIds([]); setOptionId(''); setQuantity('1'); toast(`Added ${r.added} line${r.added === 1 ? '' : 's'} (${r.units} unit${r.units === 1 ? '' : 's'}) to the batch`); },
      onError: (e) => setProblem(e.message),
    });
  };

  return (
    <fieldset className="grid gap-3 rounded-md border border-spruce-700/20 p-4">
      <legend className="px-1 font-semibold">Add to this batch</legend>
      {waiting.length ? (
        <div className="grid gap-2">
          <p className="font-semibold">Paid orders waiting for {detail.batch.modelName}</p>
          {waiting.map((l) => (
            <label key={l.id} className="flex min-h-11 items-center gap-3 rounded-md border border-spruce-700/20 px-3">
              <input type="checkbox" className="size-5" checked={lineIds.includes(l.id)} onChange={(e) => setLineIds((ids) => (e.target.checked ? [...ids, l.id] : ids.filter((x) => x !== l.id)))} />
              <span><strong className="whitespace-nowrap">{l.orderNumber}</strong> · {l.customerName} · {l.quantity} × {l.description}</span>
            </label>
          ))}
          {more > 0 ? <p className="text-sm text-ink-soft">{more} more waiting; add these first, the next ones then appear here.</p> : null}
        </div>
      ) : <p className="text-ink-soft">No other paid orders are waiting for {detail.batch.modelName}.</p>}
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1">
          <label htmlFor="add-stock-option" className="font-semibold">Stock build of</label>
          <select id="add-stock-option" value={optionId} onChange={(e) => setOptionId(e.target.value)} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3">
            <option value="">No stock build</option>
            {options.map((o) => <option key={o.id} value={o.id}>{o.name} ({o.code})</option>)}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="add-stock-quantity" className="font-semibold">Units</label>
          <input id="add-stock-quantity" type="number" min={1} max={500} inputMode="numeric" value={quantity} onChange={(e) => setQuantity(e.target.value)} disabled={!optionId}
            className="min-h-11 w-24 rounded-md border border-spruce-700/40 px-2" />
        </div>
        <Button busy={add.isPending} onClick={submit}>Add to batch</Button>
      </div>
      {problem ? <Notice tone="alarm">{problem}</Notice> : null}
    </fieldset>
  );
}
