import type { ColumnDef } from '@tanstack/react-table';
import { shopFormat } from '../../lib/format';
import { useMemo, useRef, useState, type KeyboardEvent } from 'react';
import { useParams } from 'react-router';
import { parseReadings, TRAY_MAX_SLOTS, type TrayStats } from '../../../shared/production/trays';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useImportTrayCsv, useSaveTrayReadings, useTray, type TrayDetail, type TraySlot } from './api';

const mv = (v: number) => `${shopFormat().number(v * 1000, 1)} mV`;
const volts = (v: number | null) => (v === null ? '—' : `${shopFormat().number(v, 4)} V`);
const FLAG_WORDS = { range: 'outside the device’s range', distribution: 'far from this tray' } as const;

/** The tray's readings as bars; the figure's label says the same in words for screen readers. */
function Histogram({ stats }: { stats: TrayStats }) {
  if (!stats.count) return null;
  const top = Math.max(...stats.histogram.map((b) => b.count));
  return (
    <figure className="grid gap-2">
      <div role="img" aria-label={`Histogram of ${stats.count} readings from ${volts(stats.minV)} to ${volts(stats.maxV)}, most in ${(() => { const b = stats.histogram.find((x) => x.count === top)!; return `${shopFormat().number(b.fromV, 4)}–${shopFormat().number(b.toV, 4)} V`; })()}`}
        className="flex h-32 items-end gap-1 border-b border-spruce-700/40">
        {stats.histogram.map((b) => (
          <div key={b.fromV} title={`${shopFormat().number(b.fromV, 4)}–${shopFormat().number(b.toV, 4)} V: ${b.count}`} className="flex-1 rounded-t bg-spruce-700" style={{ height: `${(b.count / top) * 100}%` }} />
        ))}
      </div>
      <figcaption className="flex justify-between font-mono text-sm text-ink-soft"><span>{volts(stats.minV)}</span><span>{volts(stats.maxV)}</span></figcaption>
    </figure>
  );
}

function StatsPanel({ detail }: { detail: TrayDetail }) {
  const { stats, tray } = detail;
  const flagged = detail.slots.filter((s) => s.flags.length).length;
  return (
    <section aria-labelledby="stats-heading" className="grid gap-3 rounded-lg bg-white p-4 shadow-sm">
      <h2 id="stats-heading" className="text-xl font-bold text-spruce-900">This tray’s readings</h2>
      {stats.count === 0 ? <p className="text-ink-soft">No readings yet. Enter the first slot below.</p> : (
        <>
          <dl className="grid grid-cols-2 gap-x-4 gap-y-1 sm:grid-cols-3">
            <div><dt className="text-sm text-ink-soft">Readings</dt><dd className="font-mono text-lg">{stats.count}</dd></div>
            <div><dt className="text-sm text-ink-soft">Mean</dt><dd className="font-mono text-lg">{volts(stats.meanV)}</dd></div>
            <div><dt className="text-sm text-ink-soft">σ</dt><dd className="font-mono text-lg">{stats.sigmaV === null ? '—' : mv(stats.sigmaV)}</dd></div>
            <div><dt className="text-sm text-ink-soft">Median</dt><dd className="font-mono text-lg">{volts(stats.medianV)}</dd></div>
            <div><dt className="text-sm text-ink-soft">Model’s nominal at {tray.testCurrentMa} mA</dt><dd className="font-mono text-lg">{volts(stats.nominal.vf)}</dd></div>
            <div><dt className="text-sm text-ink-soft">Expected for {tray.kind}</dt><dd className="font-mono text-lg">{shopFormat().number(stats.range.min, 2)}–{shopFormat().number(stats.range.max, 2)} V</dd></div>
          </dl>
          <Histogram stats={stats} />
          {stats.nominal.shifted && stats.nominal.offsetV !== null ? (
            <Notice tone="alarm">
              The tray’s median is {mv(Math.abs(stats.nominal.offsetV))} {stats.nominal.offsetV > 0 ? 'above' : 'below'} the {tray.deviceName} model’s nominal {volts(stats.nominal.vf)} (more than {mv(stats.nominal.limitV)}):
              this may be a wrong or substituted part. Check the lot’s marking before building with it.
            </Notice>
          ) : <Notice tone="good">The tray’s median is within {mv(stats.nominal.limitV)} of the model’s nominal Vf.</Notice>}
          {flagged ? <Notice tone="alarm">{flagged} reading{flagged === 1 ? '' : 's'} flagged: measure {flagged === 1 ? 'it' : 'them'} again or set {flagged === 1 ? 'it' : 'them'} aside.</Notice> : null}
        </>
      )}
    </section>
  );
}

/** Type a reading, press Enter: it is saved and the next slot comes up (mV or V both read). */
function SlotEntry({ detail }: { detail: TrayDetail }) {
  const save = useSaveTrayReadings(detail.tray.id);
  const nextFree = () => Math.min(TRAY_MAX_SLOTS, detail.slots.reduce((m, s) => Math.max(m, s.slot), 0) + 1);
  const [slot, setSlot] = useState(nextFree);
  const [value, setValue] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [said, setSaid] = useState('');
  const input = useRef<HTMLInputElement>(null);
  const label = `T${detail.tray.id}-${String(slot).padStart(2, '0')}`;
  const submit = () => {
    const { readings, problems } = parseReadings(value, slot);
    if (problems.length || readings.length !== 1) { setError(problems[0]?.replace(/^line 1: /, '') ?? 'Enter one reading, e.g. 0.5981 or 598.1 mV'); return; }
    setError(null);
    save.mutate({ readings }, {
      onSuccess: () => { setSaid(`${label} saved: ${shopFormat().number(readings[0].vf, 4)} V`); setValue(''); setSlot((s) => Math.min(TRAY_MAX_SLOTS, s + 1)); input.current?.focus(); },
      onError: (e) => setError(e.message),
    });
  };
  const onKey = (e: KeyboardEvent<HTMLInputElement>) => { if (e.key === 'Enter') { e.preventDefault(); submit(); } };
  return (
    <section aria-labelledby="entry-heading" className="grid gap-3 rounded-lg bg-white p-4 shadow-sm">
      <h2 id="entry-heading" className="text-xl font-bold text-spruce-900">Enter readings</h2>
      <p className="text-ink-soft">Measure at {detail.tray.testCurrentMa} mA, type the reading and press Enter: the next slot comes up. Volts or millivolts both work.</p>
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1">
          <label htmlFor="entry-slot" className="font-semibold">Slot</label>
          <input id="entry-slot" type="number" inputMode="numeric" min={1} max={TRAY_MAX_SLOTS} value={slot} onChange={(e) => setSlot(Math.max(1, Math.min(TRAY_MAX_SLOTS, Number(e.target.value) || 1)))}
            className="min-h-11 w-24 rounded-md border border-spruce-700/40 px-3 font-mono" />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="entry-vf" className="font-semibold">Vf of {label}</label>
          <input id="entry-vf" ref={input} inputMode="decimal" autoComplete="off" value={value} onChange={(e) => setValue(e.target.value)} onKeyDown={onKey}
            aria-invalid={error ? true : undefined} aria-describedby="entry-vf-help"
            className={`min-h-11 w-40 rounded-md border px-3 font-mono text-lg ${error ? 'border-alarm-700' : 'border-spruce-700/40'}`} />
        </div>
        <Button busy={save.isPending} onClick={submit}>Save slot</Button>
      </div>
      <p id="entry-vf-help" role="status" className={`min-h-6 ${error ? 'font-semibold text-alarm-700' : 'text-good-700'}`}>{error ?? said}</p>
    </section>
  );
}

/** A column pasted from a spreadsheet or the meter's software, or the meter's CSV file. */
function BulkEntry({ detail }: { detail: TrayDetail }) {
  const save = useSaveTrayReadings(detail.tray.id);
  const importer = useImportTrayCsv(detail.tray.id);
  const toast = useToast();
  const [text, setText] = useState('');
  const [first, setFirst] = useState(1);
  const parsed = useMemo(() => parseReadings(text, first), [text, first]);
  const importFile = (file: File | undefined) => {
    if (!file) return;
    const form = new FormData();
    form.append('firstSlot', String(first));
    form.append('file', file);
    importer.mutate(form, { onSuccess: (r) => toast(`Imported ${r.imported} readings from ${file.name}`), onError: (e) => toast(`${e.message}${(e as { fields?: Record<string, string> }).fields?.file ? `: ${(e as { fields?: Record<string, string> }).fields!.file}` : ''}`, 'alarm') });
  };
  return (
    <section aria-labelledby="bulk-heading" className="grid gap-3 rounded-lg bg-white p-4 shadow-sm">
      <h2 id="bulk-heading" className="text-xl font-bold text-spruce-900">Paste a column or import the meter’s CSV</h2>
      <div className="grid gap-3 sm:grid-cols-[1fr_auto]">
        <div className="flex flex-col gap-1">
          <label htmlFor="paste" className="font-semibold">Pasted readings</label>
          <textarea id="paste" rows={5} value={text} onChange={(e) => setText(e.target.value)} aria-describedby="paste-help" className="rounded-md border border-spruce-700/40 p-3 font-mono" />
          <p id="paste-help" className="text-sm text-ink-soft">One reading per line, or “slot, reading”. A header line is skipped.</p>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="first-slot" className="font-semibold">First slot</label>
          <input id="first-slot" type="number" min={1} max={TRAY_MAX_SLOTS} value={first} onChange={(e) => setFirst(Math.max(1, Number(e.target.value) || 1))} className="min-h-11 w-24 rounded-md border border-spruce-700/40 px-3 font-mono" />
        </div>
      </div>
      {text.trim() ? (parsed.problems.length
        ? <Notice tone="alarm">{parsed.problems.slice(0, 3).join('; ')}</Notice>
        : <p role="status">{parsed.readings.length} reading{parsed.readings.length === 1 ? '' : 's'} for slots {parsed.readings[0]?.slot}–{parsed.readings.at(-1)?.slot}.</p>) : null}
      <div className="flex flex-wrap gap-3">
        <Button disabled={!parsed.readings.length || parsed.problems.length > 0} busy={save.isPending} onClick={() => save.mutate({ readings: parsed.readings }, {
          onSuccess: () => { toast(`Saved ${parsed.readings.length} pasted readings`); setText(''); },
          onError: (e) => toast(e.message, 'alarm'),
        })}>Save pasted readings</Button>
        <label className="inline-flex min-h-11 cursor-pointer items-center rounded-md border border-spruce-700/40 px-4 font-semibold focus-within:outline focus-within:outline-2 focus-within:outline-copper-600">
          Import meter CSV
          <input type="file" accept=".csv,.txt,text/csv,text/plain" className="sr-only" onChange={(e) => { importFile(e.target.files?.[0]); e.target.value = ''; }} />
        </label>
      </div>
    </section>
  );
}

export default function TrayPage() {
  const id = Number(useParams().id);
  const tray = useTray(id);
  const fmt = useFormatters();
  const median = tray.data?.stats.medianV ?? null;
  const columns = useMemo<ColumnDef<TraySlot, unknown>[]>(() => [
    { accessorKey: 'slot', header: 'Slot', cell: ({ row }) => <span className="font-mono">{row.original.label}</span> },
    { accessorKey: 'vf', header: 'Vf', cell: ({ row }) => <span className="font-mono">{shopFormat().number(row.original.vf, 4)} V</span> },
    { id: 'offset', header: 'From median', enableSorting: false, cell: ({ row }) => (median === null ? '—' : <span className="font-mono">{shopFormat().number((row.original.vf - median) * 1000, 1)} mV</span>) },
    { id: 'flags', header: 'Flag', enableSorting: false, cell: ({ row }) => (row.original.flags.length ? <strong className="text-alarm-700">{row.original.flags.map((f) => FLAG_WORDS[f]).join('; ')}</strong> : 'OK') },
    { id: 'unit', header: 'In unit', enableSorting: false, cell: ({ row }) => (row.original.unit ? `${row.original.unit.serial} (${row.original.unit.side})` : 'free') },
  ], [median]);
  if (tray.isPending) return <Loading />;
  if (tray.isError) return <ErrorState error={tray.error} retry={() => tray.refetch()} />;
  const d = tray.data;
  return (
    <>
      <PageHeader title={`Tray ${d.tray.code}`} />
      <p className="mb-4 text-lg">{d.tray.deviceName}{d.tray.partNumber ? ` (${d.tray.partNumber})` : ''} · lot <strong>{d.tray.supplierLot}</strong> · received {fmt.date(d.tray.receivedOn)}</p>
      <div className="grid gap-6 lg:grid-cols-2">
        <div className="grid content-start gap-6">
          <SlotEntry detail={d} />
          <BulkEntry detail={d} />
        </div>
        <StatsPanel detail={d} />
      </div>
      <section aria-labelledby="slots-heading" className="mt-6 grid gap-3">
        <h2 id="slots-heading" className="text-xl font-bold text-spruce-900">Slots</h2>
        {d.slots.length ? <DataTable data={d.slots} columns={columns} caption={`Slots of tray ${d.tray.code}`} rowClassName={(s) => (s.flags.length ? 'bg-alarm-100' : '')} />
          : <p className="text-ink-soft">No slots measured yet.</p>}
      </section>
    </>
  );
}
