import { useRef, useState } from 'react';
import { Link, useParams } from 'react-router';
import { UNIT_STATE_LABELS } from '../../../shared/production/states';
import { Button } from '../../components/ui/Button';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useFormatters } from '../../lib/format';
import { useAddPhoto, useBuildUnit, useMarkBuilt, useSaveLots, type UnitDetail } from './api';
import { Checklist } from './Checklist';
import { DeviceReadings } from './DeviceReadings';
import { shopFormat } from '../../lib/format';

function PartLots({ unitId, lots }: { unitId: number; lots: UnitDetail['lots'] }) {
  const save = useSaveLots(unitId);
  const toast = useToast();
  const [values, setValues] = useState<Record<number, string>>(() => Object.fromEntries(lots.map((l) => [l.bomLineId, l.lot ?? ''])));
  if (!lots.length) return <p className="text-ink-soft">No part on this build asks for a lot number.</p>;
  return (
    <div className="grid gap-3">
      {lots.map((l) => (
        <div key={l.bomLineId} className="flex flex-col gap-1">
          <label htmlFor={`lot-${l.bomLineId}`} className="font-semibold">Lot of {l.partNumber}{l.designators ? ` (${l.designators})` : ''}</label>
          <input id={`lot-${l.bomLineId}`} value={values[l.bomLineId]} onChange={(e) => setValues((v) => ({ ...v, [l.bomLineId]: e.target.value }))} className="min-h-11 rounded-md border border-spruce-700/40 px-3 font-mono" />
        </div>
      ))}
      <div>
        <Button variant="secondary" busy={save.isPending} onClick={() => save.mutate({ lots: lots.map((l) => ({ bomLineId: l.bomLineId, lot: values[l.bomLineId] })) }, {
          onSuccess: () => toast('Part lots saved'), onError: (e) => toast(e.message, 'alarm'),
        })}>Save lots</Button>
      </div>
    </div>
  );
}

function Photos({ unitId, photos }: { unitId: number; photos: UnitDetail['photos'] }) {
  const add = useAddPhoto(unitId);
  const toast = useToast();
  const input = useRef<HTMLInputElement>(null);
  return (
    <div className="grid gap-3">
      <div className="flex flex-wrap gap-3">{photos.map((p) => <img key={p.id} src={p.url} alt={p.caption || 'Build photo'} className="h-32 rounded-md border object-cover" />)}</div>
      <label htmlFor="unit-photo" className="font-semibold">Add a photo (JPEG, PNG or WebP, up to 8 MB)</label>
      <input id="unit-photo" ref={input} type="file" accept="image/jpeg,image/png,image/webp" className="min-h-11" onChange={(e) => {
        const file = e.target.files?.[0];
        if (!file) return;
        const form = new FormData();
        form.append('photo', file);
        add.mutate(form, { onSuccess: () => { toast('Photo added'); if (input.current) input.current.value = ''; }, onError: (err) => toast(err.message, 'alarm') });
      }} />
    </div>
  );
}

export default function UnitBuildPage() {
  const id = Number(useParams().id);
  const unit = useBuildUnit(id);
  const built = useMarkBuilt(id);
  const toast = useToast();
  const fmt = useFormatters();
  if (unit.isPending) return <Loading />;
  if (unit.isError) return <ErrorState error={unit.error} retry={() => unit.refetch()} />;
  const d = unit.data;
  const open = ['waiting', 'building', 'rework'].includes(d.unit.state) && d.unit.kitted;
  const lastFail = d.history.filter((h) => h.to === 'rework').at(-1);
  return (
    <>
      <PageHeader title={`Build ${d.unit.serial}`}><Link to="/builds" className="inline-flex min-h-11 items-center underline">My builds</Link></PageHeader>
      <p className="mb-4 text-lg">{d.unit.modelName} rev. {d.unit.revisionNumber} — {d.unit.optionName} · <strong>{UNIT_STATE_LABELS[d.unit.state]}</strong>{d.unit.plannedDate ? ` · planned for ${d.unit.plannedDate}` : ''}</p>
      {d.unit.late ? <Notice tone="alarm">Late: {d.unit.late}.</Notice> : null}
      {!d.unit.kitted ? <Notice tone="alarm">This unit’s parts have not been kitted yet: ask the planner.</Notice> : null}
      {d.unit.state === 'rework' && lastFail ? <Notice tone="alarm">Back from the test bench: {lastFail.message}</Notice> : null}
      <div className="mt-6 grid gap-8">
        <section aria-labelledby="steps-heading"><h2 id="steps-heading" className="mb-3 text-xl font-bold text-spruce-900">Checklist</h2><Checklist unitId={id} steps={d.steps} open={open && d.unit.state !== 'rework'} fastStepPercent={d.fastStepPercent} /></section>
        <section aria-labelledby="vf-heading" className="rounded-lg bg-white p-6 shadow-sm"><h2 id="vf-heading" className="mb-3 text-xl font-bold text-spruce-900">Device matching</h2>
          {open ? <DeviceReadings key={d.devices.map((x) => x.measuredVf).join()} unitId={id} devices={d.devices} testCurrentMa={d.testCurrentMa} /> : <p>Readings are closed for this unit.</p>}
          {d.unit.predicted ? <p className="mt-3">Predicted THD at the reference setting: <strong>{shopFormat().number(d.unit.predicted.thdPercent, 2)} %</strong>{d.unit.predicted.fromMeasuredVf ? ' (from this unit’s measured devices)' : ' (nominal devices)'}</p> : null}
        </section>
        <section aria-labelledby="lots-heading" className="rounded-lg bg-white p-6 shadow-sm"><h2 id="lots-heading" className="mb-3 text-xl font-bold text-spruce-900">Part lots</h2>{open ? <PartLots unitId={id} lots={d.lots} /> : <p>{d.lots.map((l) => `${l.partNumber}: ${l.lot ?? '—'}`).join(' · ') || 'None asked for.'}</p>}</section>
        <section aria-labelledby="photos-heading" className="rounded-lg bg-white p-6 shadow-sm"><h2 id="photos-heading" className="mb-3 text-xl font-bold text-spruce-900">Photos</h2><Photos unitId={id} photos={d.photos} /></section>
        {open ? (
          <div><Button busy={built.isPending} onClick={() => built.mutate(undefined, { onSuccess: () => toast(`${d.unit.serial} is built and goes to the test bench`), onError: (e) => toast(e.message, 'alarm') })}>
            {d.unit.state === 'rework' ? 'Rework done: back to test' : 'Mark build finished'}
          </Button></div>
        ) : null}
        <section aria-labelledby="history-heading"><h2 id="history-heading" className="mb-2 text-xl font-bold text-spruce-900">History</h2>
          <ol className="grid gap-1 text-sm">{d.history.map((h) => <li key={h.id}>{fmt.dateTime(h.at)} · {h.by ?? 'system'} · {h.to ? `${UNIT_STATE_LABELS[h.to as keyof typeof UNIT_STATE_LABELS] ?? h.to}: ` : ''}{h.message}</li>)}</ol>
        </section>
      </div>
    </>
  );
}
