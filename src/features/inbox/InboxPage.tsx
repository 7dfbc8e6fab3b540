import type { ColumnDef } from '@tanstack/react-table';
import { useEffect, useMemo, useRef, useState } from 'react';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { shopFormat, useFormatters } from '../../lib/format';
import { attachmentUrl, useMessage, useMessages, type MessageSummary } from './api';

const kB = (bytes: number) => `${shopFormat().number(bytes / 1024, bytes < 10_240 ? 1 : 0)} kB`;

/** Owner and planner read every mail Kneepoint sent (locally: what the mail fake received). */
export default function SentMailPage() {
  const messages = useMessages();
  const [openId, setOpenId] = useState<string | null>(null);
  const { dateTime } = useFormatters();
  const columns = useMemo<ColumnDef<MessageSummary, unknown>[]>(() => [
    { header: 'Sent', accessorKey: 'receivedAt', cell: ({ getValue }) => <span className="whitespace-nowrap">{dateTime(getValue() as string)}</span> },
    { header: 'To', accessorKey: 'to', cell: ({ getValue }) => <span className="break-all">{(getValue() as string[]).join(', ')}</span> },
    {
      header: 'Subject', accessorKey: 'subject',
      cell: ({ row }) => (
        <button type="button" className="min-h-11 text-left font-semibold text-copper-700 underline" aria-pressed={openId === row.original.id} onClick={() => setOpenId(row.original.id)}>
          {row.original.subject || '(no subject)'}
        </button>
      ),
    },
    { header: 'Attachments', accessorKey: 'attachmentCount', cell: ({ getValue }) => ((getValue() as number) ? `${getValue() as number}` : '—') },
  ], [dateTime, openId]);

  return (
    <>
      <PageHeader title="Sent mail" />
      <p className="mb-4 max-w-3xl text-ink-soft">Every e-mail the shop has sent to customers, newest first, as the mail server received it.</p>
      {messages.isPending ? <Loading label="Loading mail…" /> : null}
      {messages.isError ? <ErrorState error={messages.error} retry={() => messages.refetch()} /> : null}
      {messages.data?.length === 0 ? <EmptyState title="No mail sent yet">Mail appears here a few seconds after an order is paid, scheduled, tested or shipped.</EmptyState> : null}
      {/* The preview is as wide as a mail is drawn (600 px plus margins): beside the list only on wide
          screens, above it otherwise, and it scrolls sideways rather than cutting a mail off. */}
      <div className="grid gap-6 2xl:grid-cols-[minmax(0,1fr)_44rem]">
        {openId ? <div className="min-w-0 2xl:order-2"><MessageView id={openId} onClose={() => setOpenId(null)} /></div> : null}
        {messages.data && messages.data.length > 0 ? <div className="min-w-0 2xl:order-1"><DataTable data={messages.data} columns={columns} caption="Sent mail" /></div> : null}
      </div>
    </>
  );
}

function MessageView({ id, onClose }: { id: string; onClose: () => void }) {
  const message = useMessage(id);
  const [part, setPart] = useState<'html' | 'text'>('html');
  const { dateTime } = useFormatters();
  const heading = useRef<HTMLHeadingElement>(null);
  const loaded = message.data?.id;
  // Opening a message brings it into view (it sits above the list on narrower screens).
  useEffect(() => {
    if (loaded) heading.current?.focus();
  }, [loaded]);
  if (message.isPending) return <Loading label="Opening the message…" />;
  if (message.isError) return <ErrorState error={message.error} retry={() => message.refetch()} />;
  const m = message.data;
  const showing = part === 'html' && m.html ? 'html' : 'text';
  return (
    <article aria-labelledby="message-subject" className="flex flex-col gap-3 rounded-lg border border-spruce-700/20 bg-white p-4">
      <div className="flex items-start justify-between gap-2">
        <h2 id="message-subject" ref={heading} tabIndex={-1} className="text-xl font-bold text-spruce-900">{m.subject}</h2>
        <Button type="button" variant="quiet" onClick={onClose}>Close</Button>
      </div>
      <p className="text-sm text-ink-soft">From {m.from} to {m.to.join(', ')} · {dateTime(m.receivedAt)}</p>
      <div role="group" aria-label="Part shown" className="inline-flex self-start overflow-hidden rounded-md border border-spruce-700/40">
        <button type="button" aria-pressed={showing === 'html'} disabled={!m.html} onClick={() => setPart('html')} className={`min-h-11 px-4 font-semibold ${showing === 'html' ? 'bg-spruce-800 text-white' : 'bg-white'}`}>HTML</button>
        <button type="button" aria-pressed={showing === 'text'} onClick={() => setPart('text')} className={`min-h-11 px-4 font-semibold ${showing === 'text' ? 'bg-spruce-800 text-white' : 'bg-white'}`}>Plain text</button>
      </div>
      {showing === 'html' ? (
        // Sandboxed without scripts: mail HTML is shown, never run.
        <div className="overflow-x-auto rounded-md border border-spruce-700/20">
          <iframe title={`HTML part of ${m.subject}`} sandbox="" srcDoc={m.html ?? ''} className="block h-[32rem] w-full min-w-[40rem]" />
        </div>
      ) : (
        <pre className="max-h-[32rem] overflow-auto rounded-md bg-paper p-3 text-sm whitespace-pre-wrap">{m.text}</pre>
      )}
      {m.attachments.length > 0 ? (
        <div>
          <h3 className="font-semibold">Attachments</h3>
          <ul>
            {m.attachments.map((a) => (
              <li key={a.index}>
                <a href={attachmentUrl(m.id, a.index)} className="inline-flex min-h-11 items-center font-semibold text-copper-700 underline">{a.filename ?? `attachment ${a.index + 1}`}</a>{' '}
                <span className="text-sm text-ink-soft">{a.contentType}, {kB(a.size)}</span>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </article>
  );
}
