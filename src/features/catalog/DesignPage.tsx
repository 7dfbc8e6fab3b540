import { shopFormat } from '../../lib/format';
import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router';
import { engineDriveStage } from '../../../shared/catalog/circuit';
import { candidateBom, capacitanceFromValue, suggestedSurchargeCents, type CapacitorPart } from '../../../shared/design/costing';
import { DESIGN_LIMITS, designFormSchema, designInputFromForm, type DesignForm, type DesignInputJson, type DesignStage, type DriveControl } from '../../../shared/design/schema';
import { countCandidates, parseDesignInput } from '../../../shared/design/search';
import { gainAtDrive } from '../../../shared/engine/index';
import { SpectrumBars, ThdDriveChart } from '../../components/charts';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { useCreateOption, useDevices, useModel, usePartsPage, type Device, type ModelDetail } from './api';
import type { DesignedCandidate, DesignRequest, DesignResponse } from './design-messages';
import { farads, ohms, percent } from './units';

const DEFAULTS = {
  thdLo: 5, thdHi: 15, space: 'stocked', symmetry: 'any', maxPerSide: 2, shunt: true, feedback: true,
  eSeries: 'E6', seriesMin: 1000, seriesMax: 10000, feedbackOhms: 100000, groundOhms: 4700,
} as unknown as DesignForm;

type Done = Extract<DesignResponse, { kind: 'done' }>;

/** The search in a Web Worker: progress, cancel, and the shortlist when it ends. */
function useDesignWorker() {
  const worker = useRef<Worker | null>(null);
  const current = useRef(0);
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);
  const [result, setResult] = useState<Done | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    const w = new Worker(new URL('./design.worker.ts', import.meta.url), { type: 'module' });
    w.onmessage = (e: MessageEvent<DesignResponse>) => {
      const r = e.data;
      if (r.id !== current.current) return;
      if (r.kind === 'progress') setProgress({ done: r.done, total: r.total });
      else if (r.kind === 'done') { setResult(r); setProgress(null); } else { setError(r.path ? `${r.path}: ${r.message}` : r.message); setProgress(null); }
    };
    worker.current = w;
    return () => w.terminate();
  }, []);
  /** Starts a search whose size the page has already counted: the bar shows at once, at 0 of `total`. */
  const run = (input: unknown, drive: unknown, total: number) => {
    current.current += 1;
    setResult(null); setError(null); setProgress({ done: 0, total });
    worker.current?.postMessage({ id: current.current, kind: 'run', input, drive } satisfies DesignRequest);
  };
  const cancel = () => worker.current?.postMessage({ id: current.current, kind: 'cancel' } satisfies DesignRequest);
  return { run, cancel, progress, result, error };
}

const side = (s: DesignedCandidate['strings']['positive']) => (s ? `${s.count}× ${s.name}` : '—');

const clip = (s: string, max: number) => (s.length <= max ? s : `${s.slice(0, max - 1)}…`);

/** A short option code for a designed option, e.g. "DK3F9Q" (from the clock, in base 36). */
function newOptionCode(): string {
  return `D${Date.now().toString(36).slice(-5).toUpperCase()}`;
}

const count = (n: number) => shopFormat().count(n);

/**
 * The devices a search uses, best-stocked first: copies with the same parameters are searched once
 * (the first), so a chosen candidate links the copy with the most in stock.
 */
function spaceDevices(all: Device[], space: DesignForm['space']): Device[] {
  const chosen = space === 'stocked' ? all.filter((d) => (d.available ?? 0) > 0) : all;
  return [...chosen].sort((a, b) => (b.available ?? -1) - (a.available ?? -1));
}

type Plan = { input: DesignInputJson; devices: Device[]; total: number } | { problem: string };

/** The search a form describes, counted before it starts (the same parse the worker runs). */
function planSearch(f: DesignForm, stage: DesignStage, all: Device[], control: DriveControl, caps: CapacitorPart[]): Plan {
  const devices = spaceDevices(all, f.space);
  if (devices.length === 0) {
    return { problem: f.space === 'stocked' ? 'No device in the library is in stock: search the whole library, or receive stock first' : 'the device library is empty' };
  }
  const farads = caps.filter((c) => f.caps.includes(c.partId)).map((c) => c.farads);
  const input = designInputFromForm(f, stage, devices.map((d) => ({ name: d.name, is: d.is, n: d.n, rs: d.rs, eg: d.eg, xti: d.xti })), control, farads);
  try {
    return { input, devices, total: countCandidates(parseDesignInput(input)) };
  } catch (e) {
    return { problem: e instanceof Error ? e.message : String(e) };
  }
}

/** Owner: state the sound and the limits; every candidate in the space is computed and the nearest ten shown. */
export default function DesignPage() {
  const id = Number(useParams().id);
  const model = useModel(id);
  const devices = useDevices();
  const capParts = usePartsPage({ q: '', category: 'capacitor', lowStock: false, sort: 'partNumber', dir: 'asc', page: 1, pageSize: 100 });
  const search = useDesignWorker();
  const create = useCreateOption(id);
  const navigate = useNavigate();
  const form = useForm<DesignForm>({ resolver: zodResolver(designFormSchema) as never, defaultValues: DEFAULTS });
  const [space, setSpace] = useState<Device[]>([]);
  const [refused, setRefused] = useState<string | null>(null);
  if (model.isPending || devices.isPending || capParts.isPending) return <Loading />;
  if (capParts.isError) return <ErrorState error={capParts.error} retry={() => capParts.refetch()} />;
  if (model.isError) return <ErrorState error={model.error} retry={() => model.refetch()} />;
  if (devices.isError) return <ErrorState error={devices.error} retry={() => devices.refetch()} />;
  const rev = model.data.activeRevision;
  if (!rev) return <Notice tone="alarm">This model has no active revision to design for.</Notice>;
  const drive = engineDriveStage(rev.drive);
  const stage = { toneHz: 1000, inputPeakV: drive.inputPeakV, driveGain: gainAtDrive(drive, rev.drive.referenceDrive), railPeakV: drive.railPeakV, temperatureC: 27 };
  const control: DriveControl = { minGain: drive.minGain, maxGain: drive.maxGain, taper: drive.taper };
  // Capacitors in stock whose value reads as a capacitance the engine takes (≤ 1 µF), smallest first.
  const caps: CapacitorPart[] = capParts.data.items
    .map((p) => ({ partId: p.id, partNumber: p.partNumber, farads: capacitanceFromValue(p.value) ?? 0, unitCostCents: p.unitCostCents, available: p.available }))
    .filter((p) => p.farads > 0 && p.farads <= 1e-6 && p.available > 0)
    .sort((a, b) => a.farads - b.farads);
  const errors = form.formState.errors;
  const onSubmit = form.handleSubmit((f) => {
    const plan = planSearch(f, stage, devices.data, control, caps);
    if ('problem' in plan) { setRefused(plan.problem); return; }
    setRefused(null);
    setSpace(plan.devices);
    search.run(plan.input, drive, plan.total);
  });
  const costing = (c: DesignedCandidate) => candidateCosting(c, space, caps, model.data);
  const createFrom = (c: DesignedCandidate, rank: number) => {
    const ids = (s: DesignedCandidate['strings']['positive']) => (s ? Array.from({ length: s.count }, () => space[s.device].deviceId) : []);
    const topology = c.clipper.topology === 'feedback' ? 'feedback' : 'shunt';
    const network = topology === 'shunt'
      ? { seriesOhms: c.clipper.seriesOhms, shuntFarads: c.clipper.shuntFarads }
      : { feedbackOhms: c.clipper.feedbackOhms, groundOhms: c.clipper.groundOhms, feedbackFarads: c.clipper.feedbackFarads };
    const costs = costing(c);
    const code = newOptionCode();
    create.mutate({
      // Option names hold at most 80 characters; long device names are cut with an ellipsis.
      code, name: clip(`Designed ${rank}: ${side(c.strings.positive)} / ${side(c.strings.negative)}`, 80),
      description: `Found by the option designer at THD_F ${percent(c.at.thdF)} (distance ${shopFormat().number(c.distance, 3)}).`,
      topology, network, positive: ids(c.strings.positive), negative: ids(c.strings.negative), surchargeCents: costs.surchargeCents, published: false,
    }, { onSuccess: (r) => void navigate(`/catalog/models/${id}/options/${r.optionId}`) });
  };
  const p = search.progress;
  return (
    <>
      <PageHeader title={`Design an option — ${model.data.name}`}>
        <Link to={`/catalog/models/${id}`} className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">Back to {model.data.name}</Link>
      </PageHeader>
      <p className="mb-4 text-ink-soft">Revision {rev.number} at its reference drive ({Math.round(rev.drive.referenceDrive * 100)} %, gain {shopFormat().number(stage.driveGain, 1)}, {shopFormat().significant(stage.inputPeakV)} V in). Every candidate is computed by the engine; distance 0 means inside every range. A pair and its mirror image (the two sides swapped) give the same harmonic levels, so each pair is searched and shown once.</p>
      <form onSubmit={onSubmit} noValidate className="grid gap-4 rounded-lg bg-white p-4 shadow-sm md:grid-cols-4">
        <TextField label="THD_F from (%)" inputMode="decimal" error={errors.thdLo?.message} {...form.register('thdLo')} />
        <TextField label="THD_F to (%)" inputMode="decimal" error={errors.thdHi?.message} {...form.register('thdHi')} />
        <TextField label="H2 − H3 from (dB)" hint="optional; positive = even-dominant" inputMode="decimal" error={errors.h2h3Lo?.message} {...form.register('h2h3Lo')} />
        <TextField label="H2 − H3 to (dB)" inputMode="decimal" error={errors.h2h3Hi?.message} {...form.register('h2h3Hi')} />
        <TextField label="Output fundamental from (V peak)" hint="optional" inputMode="decimal" error={errors.v1Lo?.message} {...form.register('v1Lo')} />
        <TextField label="Output fundamental to (V peak)" inputMode="decimal" error={errors.v1Hi?.message} {...form.register('v1Hi')} />
        <TextField label="Clipping onset from (% drive)" hint="optional; where THD_F passes 1 %" inputMode="decimal" error={errors.onsetLo?.message} {...form.register('onsetLo')} />
        <TextField label="Clipping onset to (% drive)" inputMode="decimal" error={errors.onsetHi?.message} {...form.register('onsetHi')} />
        <TextField label="Second drive (%)" hint="optional; a THD_F range there" inputMode="decimal" error={errors.secondDrive?.message} {...form.register('secondDrive')} />
        <div className="grid grid-cols-2 gap-2">
          <TextField label="THD_F there from (%)" inputMode="decimal" error={errors.secondThdLo?.message} {...form.register('secondThdLo')} />
          <TextField label="THD_F there to (%)" inputMode="decimal" error={errors.secondThdHi?.message} {...form.register('secondThdHi')} />
        </div>
        <div className="flex flex-col gap-1"><label htmlFor="design-space" className="font-semibold">Devices</label>
          <select id="design-space" className="min-h-11 rounded-md border px-2" {...form.register('space')}><option value="stocked">In stock</option><option value="library">Whole library</option></select></div>
        <div className="flex flex-col gap-1"><label htmlFor="design-symmetry" className="font-semibold">Symmetry</label>
          <select id="design-symmetry" className="min-h-11 rounded-md border px-2" {...form.register('symmetry')}><option value="any">Either</option><option value="symmetric">Symmetric</option><option value="asymmetric">Asymmetric</option></select></div>
        <TextField label="Devices in series per side, up to" inputMode="numeric" error={errors.maxPerSide?.message} {...form.register('maxPerSide')} />
        <div className="flex flex-col gap-1"><label htmlFor="design-eSeries" className="font-semibold">Resistor series</label>
          <select id="design-eSeries" className="min-h-11 rounded-md border px-2" {...form.register('eSeries')}><option>E6</option><option>E12</option><option>E24</option></select></div>
        <TextField label="Series resistor from (Ω)" inputMode="decimal" error={errors.seriesMin?.message} {...form.register('seriesMin')} />
        <TextField label="Series resistor to (Ω)" inputMode="decimal" error={errors.seriesMax?.message} {...form.register('seriesMax')} />
        <TextField label="Feedback Rf (Ω)" inputMode="decimal" error={errors.feedbackOhms?.message} {...form.register('feedbackOhms')} />
        <TextField label="Feedback Rg (Ω)" inputMode="decimal" error={errors.groundOhms?.message} {...form.register('groundOhms')} />
        <fieldset className="flex items-center gap-4"><legend className="font-semibold">Topologies</legend>
          <label className="flex min-h-11 items-center gap-2"><input type="checkbox" className="size-6" {...form.register('shunt')} /> Shunt</label>
          <label className="flex min-h-11 items-center gap-2"><input type="checkbox" className="size-6" {...form.register('feedback')} /> Feedback</label>
          {errors.feedback ? <span className="text-sm font-semibold text-alarm-700">{errors.feedback.message}</span> : null}
        </fieldset>
        <fieldset className="md:col-span-3 flex flex-wrap items-center gap-x-4"><legend className="font-semibold">Capacitor across the devices (in stock; none is always tried)</legend>
          {caps.length === 0 ? <span className="text-ink-soft">No capacitor up to 1 µF is in stock.</span> : caps.map((c) => (
            <label key={c.partId} className="flex min-h-11 items-center gap-2"><input type="checkbox" className="size-6" value={String(c.partId)} {...form.register('caps')} /> {c.partNumber}</label>
          ))}
        </fieldset>
        <div className="flex items-end gap-2">
          <Button type="submit" disabled={p !== null}>Search</Button>
          {p ? <Button type="button" variant="secondary" onClick={search.cancel}>Cancel</Button> : null}
        </div>
      </form>
      {p ? (
        <div className="mt-4 flex items-center gap-4">
          <progress aria-label="Candidates computed" className="h-4 flex-1" max={Math.max(1, p.total)} value={p.done} />
          <span className="font-mono">{count(p.done)} / {count(p.total)}</span>
        </div>
      ) : null}
      {refused ? <Notice tone="alarm">Not started: {refused}. One search computes at most {count(DESIGN_LIMITS.candidates)} candidates; devices with the same parameters count once.</Notice> : null}
      {search.error ? <Notice tone="alarm">{search.error}</Notice> : null}
      {create.isError ? <Notice tone="alarm">The option was not created: {create.error.message}</Notice> : null}
      {search.result ? <Results result={search.result} onCreate={createFrom} busy={create.isPending} costing={costing} /> : null}
    </>
  );
}

type Costing = ReturnType<typeof candidateCosting>;

/** A candidate's BOM delta, its parts cost, the unit cost with it, and the suggested surcharge. */
function candidateCosting(c: DesignedCandidate, space: Device[], caps: CapacitorPart[], model: ModelDetail) {
  const farads = c.clipper.topology === 'feedback' ? c.clipper.feedbackFarads : c.clipper.shuntFarads;
  const capacitor = farads > 0 ? caps.find((p) => p.farads === farads) ?? null : null;
  const bom = candidateBom(c.strings, space, capacitor);
  const cheapest = Math.min(...model.options.map((o) => o.deviceCents ?? 0), Number.POSITIVE_INFINITY);
  const baseline = Number.isFinite(cheapest) ? cheapest : 0;
  const unitCost = model.cost ? model.cost.totalCents + bom.cents : null;
  return { bom, unitCostCents: unitCost, surchargeCents: suggestedSurchargeCents(bom.cents, baseline, model.basePriceCents, model.cost?.totalCents ?? null) };
}

/** The room a chart takes, with its title, until it is drawn (so nothing below it moves). */
function ChartSpace({ title }: { title: string }) {
  return (
    <figure className="rounded-lg bg-white p-4 shadow-sm" aria-busy="true">
      <figcaption className="mb-2 font-semibold text-spruce-900">{title}</figcaption>
      <div className="flex h-64 items-center justify-center text-ink-soft">Drawing the chart…</div>
    </figure>
  );
}

/** H2 or H3 in dBc without the unit (the column names it), e.g. "-12.9", or "< -200" for an absent harmonic. */
const level = (v: number) => (v <= -200 ? `< ${shopFormat().number(-200, 0)}` : shopFormat().number(v, 1));

function Results({ result, onCreate, busy, costing }: { result: Done; onCreate: (c: DesignedCandidate, rank: number) => void; busy: boolean; costing: (c: DesignedCandidate) => Costing }) {
  const { money } = useFormatters();
  const top = result.candidates;
  // The two charts are drawn one per task after the table: a chart's first draw is a main-thread task of
  // about 40 ms, so drawn with the table in one task the screen would stall past 50 ms.
  const [charts, setCharts] = useState(0);
  useEffect(() => {
    if (charts >= 2) return;
    const timer = setTimeout(() => setCharts((n) => n + 1), 0);
    return () => clearTimeout(timer);
  }, [charts]);
  // The onset and second-drive columns show only when the target asked for them.
  const hasOnset = top.some((c) => c.onsetDrive !== undefined);
  const hasSecond = top.some((c) => c.second !== undefined);
  const onset = (c: DesignedCandidate) => (c.onsetDrive === undefined ? '—' : c.onsetDrive === null ? 'never' : `${Math.round(c.onsetDrive * 100)} %`);
  const circuit = (c: DesignedCandidate) => {
    const f = c.clipper.topology === 'feedback' ? c.clipper.feedbackFarads : c.clipper.shuntFarads;
    const cap = f > 0 ? ` + ${farads(f)}` : '';
    return c.clipper.topology === 'shunt' ? `Shunt, ${ohms(c.clipper.seriesOhms)}${cap}` : `Feedback${cap}`;
  };
  const th = 'px-1.5 py-2 align-bottom';
  const td = 'px-1.5 py-2';
  const num = `${td} whitespace-nowrap text-right font-mono`;
  return (
    <section className="mt-6 flex flex-col gap-4" aria-label="Design results">
      <Notice tone={top[0]?.distance === 0 ? 'good' : 'info'}>
        {result.cancelled ? 'Cancelled: ' : ''}{shopFormat().count(result.searched)} of {shopFormat().count(result.total)} candidates computed ({shopFormat().number(result.msPerCandidate, 2)} ms each).
        {top[0] && top[0].distance > 0 ? ' None meets every range; the nearest are shown.' : ''}
      </Notice>
      <div className="grid gap-4 lg:grid-cols-2">
        {charts >= 1 ? <ThdDriveChart series={top.slice(0, 5).map((c, i) => ({ label: `#${i + 1}`, points: c.sweep }))} /> : <ChartSpace title="THD_F against drive" />}
        {charts >= 2 ? <SpectrumBars title="H2–H7 at the reference drive" series={top.slice(0, 5).map((c, i) => ({ label: `#${i + 1}`, dbc: c.at.harmonics.slice(1, 7).map((h) => h.dbc) }))} /> : <ChartSpace title="H2–H7 at the reference drive" />}
      </div>
      <p className="text-sm text-ink-soft">Parts cost is what the candidate's devices (and capacitor) add to the bill of materials. The suggested surcharge keeps the model's margin (base price ÷ unit cost) on the cost beyond the cheapest existing option, rounded up to 0.50; it is set on an option created from a candidate and can be changed there.</p>
      <div className="overflow-x-auto">
      <table className="w-full rounded-lg bg-white text-left text-sm shadow-sm">
        <caption className="p-2 text-left text-base font-semibold text-spruce-900">The nearest ten</caption>
        <thead className="bg-spruce-100"><tr>
          <th className={th}>#</th><th className={th}>Circuit and parts</th>
          <th className={`${th} text-right`}>THD_F</th><th className={`${th} text-right`}>H2 (dBc)</th><th className={`${th} text-right`}>H3 (dBc)</th>
          <th className={`${th} text-right`}>Out (V pk)</th>
          {hasOnset ? <th className={`${th} text-right`}>Onset</th> : null}
          {hasSecond ? <th className={`${th} text-right`}>THD_F at 2nd drive</th> : null}
          <th className={`${th} text-right`}>Parts cost</th><th className={`${th} text-right`}>Unit cost</th><th className={`${th} text-right`}>Suggested surcharge</th>
          <th className={`${th} text-right`}>Distance</th><th className={th}><span className="sr-only">Action</span></th>
        </tr></thead>
        <tbody>{top.map((c, i) => { const k = costing(c); return (
          <tr key={i} className="border-t align-top">
            <td className={td}>{i + 1}</td>
            <td className={`${td} min-w-72`}>
              <span className="block font-semibold">{circuit(c)}</span>
              <span className="block">+ {side(c.strings.positive)}</span>
              <span className="block">− {side(c.strings.negative)}</span>
              <span className="block text-ink-soft">Adds {k.bom.lines.map((l) => `${l.quantity} × ${l.partNumber}`).join(', ') || 'no parts'}{k.bom.unlinked.length ? ` (no part linked: ${k.bom.unlinked.join(', ')})` : ''}</span>
            </td>
            <td className={num}>{percent(c.at.thdF)}</td><td className={num}>{level(c.at.harmonics[1].dbc)}</td><td className={num}>{level(c.at.harmonics[2].dbc)}</td>
            <td className={num}>{shopFormat().number(c.at.fundamentalPeakV, 2)}</td>
            {hasOnset ? <td className={num}>{onset(c)}</td> : null}
            {hasSecond ? <td className={num}>{c.second ? percent(c.second.thdF) : '—'}</td> : null}
            <td className={num}>{money(k.bom.cents)}</td><td className={num}>{k.unitCostCents === null ? '—' : money(k.unitCostCents)}</td><td className={num}>{money(k.surchargeCents)}</td>
            <td className={num}>{shopFormat().number(c.distance, 3)}</td>
            <td className={td}><Button type="button" variant="secondary" className="whitespace-nowrap" busy={busy} onClick={() => onCreate(c, i + 1)}>Create option</Button></td>
          </tr>
        ); })}</tbody>
      </table>
      </div>
    </section>
  );
}
