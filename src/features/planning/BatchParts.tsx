import { useState } from 'react';
import { Section } from '../../components/ui/Section';
import type { BatchDetail } from './api';
import { RequirementsTable } from './RequirementsTable';
import { shopFormat } from '../../lib/format';

/** Lists longer than this start folded. */
export const LONG_LIST = 12;

/** Parts against stock, shortages first: "only short" shows just what to buy; the purchase list is the CSV to order from. */
export function BatchParts({ detail, released }: { detail: BatchDetail; released: boolean }) {
  const rows = [...detail.requirements].sort((a, b) => Number(b.shortage > 0) - Number(a.shortage > 0) || b.shortage - a.shortage);
  const short = rows.filter((r) => r.shortage > 0);
  const [onlyShort, setOnlyShort] = useState(short.length > 0);
  const shown = onlyShort ? short : rows;
  const summary = !rows.length ? 'Every unit is kitted: nothing left to draw from stock.'
    : short.length ? `${short.length} of ${rows.length} parts short · earliest start ${shopFormat().date(detail.earliestStart.date)}${detail.earliestStart.waitingOn ? ` (waiting on ${detail.earliestStart.waitingOn})` : ''}`
    : `All ${rows.length} parts covered by free stock.`;
  return (
    <Section id="parts" title="Parts against stock" summary={summary} defaultOpen={short.length > 0 || rows.length <= LONG_LIST}
      actions={short.length ? (
        <a className="inline-flex min-h-11 items-center rounded-md border border-spruce-700/40 bg-white px-4 font-semibold" href={`/api/batches/${detail.batch.id}/purchase-list.csv`}>
          Purchase list (CSV)
        </a>
      ) : null}>
      {rows.length ? (
        <div className="grid gap-3">
          <label className="inline-flex min-h-11 w-fit items-center gap-3 font-semibold">
            <input type="checkbox" className="size-5" checked={onlyShort} onChange={(e) => setOnlyShort(e.target.checked)} />
            Only short parts ({short.length})
          </label>
          {shown.length ? <RequirementsTable rows={shown} released={released} /> : <p className="text-good-700 font-semibold">Nothing is short.</p>}
        </div>
      ) : <p className="text-ink-soft">Nothing left to draw from stock.</p>}
    </Section>
  );
}
