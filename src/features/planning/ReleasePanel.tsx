import { useState } from 'react';
import { Button } from '../../components/ui/Button';
import { Dialog } from '../../components/ui/Dialog';
import { Notice } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { useReleaseBatch, type BatchDetail } from './api';
import { shopFormat } from '../../lib/format';

/**
 * Release to the bench. Releasing freezes the revision, creates the units and mails each customer
 * their ship date, so it asks first and names everyone it will mail.
 */
export function ReleasePanel({ detail }: { detail: BatchDetail }) {
  const release = useReleaseBatch(detail.batch.id);
  const toast = useToast();
  const shortages = detail.requirements.filter((r) => r.shortage > 0);
  const units = detail.lines.reduce((n, l) => n + l.quantity, 0);
  const mail = detail.customersToMail;
  const [startDate, setStartDate] = useState(detail.earliestStart.date);
  const [reason, setReason] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [asking, setAsking] = useState(false);

  const ask = () => {
    if (shortages.length && reason.trim().length < 3) {
      setProblem('Give a reason of at least 3 characters to release with shortages');
      return;
    }
    setProblem(null);
    setAsking(true);
  };
  const confirm = () => release.mutate({ startDate, overrideReason: reason.trim() || undefined }, {
    onSuccess: (r) => {
      setAsking(false);
      toast(r.state === 'releasing'
        ? `Releasing: ${r.units} units are being created in the background; customers are told their ship date once all exist`
        : `Released: ${r.units} unit${r.units === 1 ? '' : 's'} created, ${r.orders} customer${r.orders === 1 ? '' : 's'} told their ship date`);
    },
    onError: (e) => { setAsking(false); setProblem(e.message); },
  });

  return (
    <div className="grid gap-3">
      <p className="text-ink-soft">Release freezes revision {detail.batch.revisionNumber}, creates the serial-numbered units and tells each customer when their pedal should ship.</p>
      {shortages.length ? (
        <Notice tone="alarm">{shortages.length} part{shortages.length === 1 ? ' is' : 's are'} short. Earliest start {shopFormat().date(detail.earliestStart.date)}{detail.earliestStart.waitingOn ? ` (waiting on ${detail.earliestStart.waitingOn})` : ''}. Order them, or give a reason to release anyway.</Notice>
      ) : <Notice tone="good">Every part is covered by free stock.</Notice>}
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Building starts on" type="date" value={startDate} onChange={(e) => setStartDate(e.target.value)} />
        {shortages.length ? <TextField label="Reason to release with shortages" value={reason} onChange={(e) => setReason(e.target.value)} hint="Kept with the batch" /> : null}
      </div>
      {problem ? <Notice tone="alarm">{problem}</Notice> : null}
      <div><Button busy={release.isPending} onClick={ask}>Release batch…</Button></div>
      <Dialog open={asking} title={`Release batch ${detail.batch.label}?`} onClose={() => setAsking(false)}>
        <div className="grid gap-3">
          <p>This creates {units} unit{units === 1 ? '' : 's'}, freezes revision {detail.batch.revisionNumber}{shortages.length ? ` with ${shortages.length} part${shortages.length === 1 ? '' : 's'} short` : ''}, and cannot be undone: afterwards only single units can be cancelled.</p>
          {mail.length ? (
            <>
              <p className="font-semibold">It mails {mail.length} customer{mail.length === 1 ? '' : 's'} their estimated ship date:</p>
              <ul aria-label="Customers to be mailed" className="grid max-h-60 gap-1 overflow-y-auto rounded-md border border-spruce-700/20 p-2">
                {mail.map((m) => <li key={m.orderNumber}>{m.name} · order <span className="whitespace-nowrap font-mono">{m.orderNumber}</span> · {m.email}</li>)}
              </ul>
            </>
          ) : <p className="font-semibold">No customer is mailed: this batch builds for finished stock only.</p>}
          <div className="flex flex-wrap justify-end gap-2">
            <Button variant="secondary" onClick={() => setAsking(false)}>Not yet</Button>
            <Button busy={release.isPending} onClick={confirm}>{mail.length ? `Release and mail ${mail.length} customer${mail.length === 1 ? '' : 's'}` : 'Release'}</Button>
          </div>
        </div>
      </Dialog>
    </div>
  );
}
