import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useParams } from 'react-router';
import { benchTestSchema, CAPTURE_LIMITS, type BenchTestInput } from '../../../shared/schemas/production';
import { UNIT_STATE_LABELS } from '../../../shared/production/states';
import { Button } from '../../components/ui/Button';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { RegenerateSheetButton, SpecSheetLink } from '../../components/spec-sheets';
import { useToast } from '../../components/ui/toast';
import { ApiError, applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useRecordTest, useTestUnit, type TestRecord } from './api';
import { HarmonicBars } from './HarmonicBars';
import { MainsCaution } from './MainsCaution';

/** A harmonic level in words; a symmetric pair's even orders sit far below anything a bench can read. */
const dbcText = (dbc?: number) => (dbc === undefined ? '—' : dbc < -120 ? 'below −120 dBc' : `${dbc.toFixed(1)} dBc`);

function TestResult({ test, predicted }: { test: TestRecord; predicted?: { order: number; dbc: number }[] }) {
  const fmt = useFormatters();
  return (
    <li className="rounded-lg border border-spruce-700/20 bg-white p-4">
      <p className="font-semibold">{fmt.dateTime(test.createdAt)} · {test.outcome === 'pass' ? 'Passed' : 'Sent back for rework'} by {test.testerName ?? '—'}{test.reason ? `: ${test.reason}` : ''}</p>
      <p>Current draw {test.currentDrawMa.toFixed(1)} mA · measured THD {test.measuredThdPercent.toFixed(2)} % · predicted {test.predictedThdPercent?.toFixed(2) ?? '—'} % (±{test.tolerancePercent} %)
        {' · '}<strong className={test.withinTolerance ? 'text-good-700' : 'text-alarm-700'}>{test.withinTolerance ? 'within tolerance' : 'out of tolerance'}</strong></p>
      {test.capture ? (
        <div className="mt-2">
          <p>Capture: {(test.capture.sampleRate / 1000).toFixed(1)} kHz, {test.capture.channels === 1 ? 'mono' : 'stereo'}, {test.capture.durationS.toFixed(2)} s · fundamental {test.capture.fundamentalHz.toFixed(1)} Hz · THD {test.capture.thdPercent.toFixed(2)} %</p>
          <HarmonicBars measured={test.capture.harmonics} predicted={predicted} />
        </div>
      ) : null}
    </li>
  );
}

export default function UnitTestPage() {
  const id = Number(useParams().id);
  const unit = useTestUnit(id);
  const record = useRecordTest(id);
  const toast = useToast();
  const form = useForm<BenchTestInput>({ resolver: zodResolver(benchTestSchema) as never, defaultValues: { outcome: 'pass', reason: '' } });
  const errors = form.formState.errors;
  if (unit.isPending) return <Loading />;
  if (unit.isError) return <ErrorState error={unit.error} retry={() => unit.refetch()} />;
  const d = unit.data;
  const predicted = d.unit.predicted;

  const onSubmit = form.handleSubmit((values) => {
    const data = new FormData();
    data.append('currentDrawMa', String(values.currentDrawMa));
    data.append('measuredThdPercent', String(values.measuredThdPercent));
    data.append('outcome', values.outcome);
    data.append('reason', values.reason);
    const file = (document.getElementById('capture-file') as HTMLInputElement | null)?.files?.[0];
    if (file) data.append('capture', file);
    record.mutate(data, {
      onSuccess: (r) => toast(`${d.unit.serial}: ${r.unitState === 'passed' ? 'passed' : 'sent back for rework'}${r.capture ? `; capture THD ${r.capture.thdPercent.toFixed(2)} %` : ''}${r.withinTolerance ? '' : ' (out of tolerance)'}`, r.withinTolerance ? undefined : 'alarm'),
      onError: (e) => { applyFieldErrors(e, form.setError); if (e instanceof ApiError && e.fields?.capture) form.setError('root', { message: e.fields.capture }); toast(e.message, 'alarm'); },
    });
  });

  return (
    <>
      <PageHeader title={`Test ${d.unit.serial}`}>
        <SpecSheetLink serial={d.unit.serial} label={['passed', 'in_stock', 'shipped'].includes(d.unit.state) ? 'Download spec sheet' : 'Preview spec sheet'} />
        {['passed', 'in_stock', 'shipped'].includes(d.unit.state) ? <RegenerateSheetButton serial={d.unit.serial} /> : null}
        <Link to="/bench" className="inline-flex min-h-11 items-center underline">Test bench</Link>
      </PageHeader>
      <MainsCaution />
      <p className="mb-4 text-lg">{d.unit.modelName} rev. {d.unit.revisionNumber} — {d.unit.optionName} · built by {d.unit.assemblerName ?? '—'} · <strong>{UNIT_STATE_LABELS[d.unit.state]}</strong></p>
      <section className="mb-6 rounded-lg bg-white p-6 shadow-sm" aria-labelledby="predicted-heading">
        <h2 id="predicted-heading" className="mb-2 text-xl font-bold text-spruce-900">Predicted for this unit</h2>
        {predicted ? <p>THD<sub>F</sub> at drive {Math.round(d.unit.referenceDrive * 100)} % with a 1 kHz tone: <strong>{predicted.thdPercent.toFixed(2)} %</strong> (tolerance ±{d.thdTolerancePercent} % of it){predicted.fromMeasuredVf ? ', from the measured devices' : ', from nominal devices'}. H2 {dbcText(predicted.harmonics.find((h) => h.order === 2)?.dbc)} · H3 {dbcText(predicted.harmonics.find((h) => h.order === 3)?.dbc)}.</p> : <p>No prediction yet: it is computed when the test is saved.</p>}
        <p className="mt-1 text-sm text-ink-soft">Devices: {d.devices.map((x) => `${x.name} (${x.side}) ${x.measuredVf !== null ? `${(x.measuredVf * 1000).toFixed(0)} mV` : 'not measured'}`).join(' · ')}. Supply {d.unit.supplyV} V DC, centre negative.</p>
      </section>
      {d.unit.state === 'built' ? (
        <form onSubmit={onSubmit} noValidate className="mb-8 grid gap-4 rounded-lg bg-white p-6 shadow-sm sm:grid-cols-2">
          <h2 className="text-xl font-bold text-spruce-900 sm:col-span-2">Bench test</h2>
          <TextField label="Current draw (mA)" inputMode="decimal" error={errors.currentDrawMa?.message} {...form.register('currentDrawMa')} />
          <TextField label="Measured THD at the reference setting (%)" inputMode="decimal" error={errors.measuredThdPercent?.message} {...form.register('measuredThdPercent')} />
          <div className="flex flex-col gap-1 sm:col-span-2">
            <label htmlFor="capture-file" className="font-semibold">WAV capture of the 1 kHz test tone (optional)</label>
            <input id="capture-file" type="file" accept=".wav,audio/wav" className="min-h-11" aria-describedby="capture-hint" />
            <p id="capture-hint" className={`text-sm ${errors.root ? 'font-semibold text-alarm-700' : 'text-ink-soft'}`}>{errors.root?.message ?? `WAV only, mono or stereo, 44.1/48/96 kHz, ${CAPTURE_LIMITS.minSeconds}–${CAPTURE_LIMITS.maxSeconds} s, up to ${CAPTURE_LIMITS.maxBytes / 1048576} MB`}</p>
          </div>
          <fieldset className="flex flex-wrap gap-3 sm:col-span-2">
            <legend className="mb-1 font-semibold">Outcome</legend>
            <label className="flex min-h-11 items-center gap-2 rounded-md border border-spruce-700/30 px-3"><input type="radio" value="pass" className="size-5" {...form.register('outcome')} /> Pass</label>
            <label className="flex min-h-11 items-center gap-2 rounded-md border border-spruce-700/30 px-3"><input type="radio" value="fail" className="size-5" {...form.register('outcome')} /> Send back for rework</label>
          </fieldset>
          <TextField className="sm:col-span-2" label="Reason (needed to send back, or to pass out of tolerance)" error={errors.reason?.message} {...form.register('reason')} />
          <div className="sm:col-span-2"><Button type="submit" busy={record.isPending}>Save test</Button></div>
        </form>
      ) : <Notice>{d.unit.serial} is {UNIT_STATE_LABELS[d.unit.state].toLowerCase()}: nothing to test now.</Notice>}
      <section aria-labelledby="tests-heading"><h2 id="tests-heading" className="mb-2 text-xl font-bold text-spruce-900">Test records</h2>
        {d.tests.length ? <ul className="grid gap-3">{d.tests.map((t) => <TestResult key={t.id} test={t} predicted={predicted?.harmonics} />)}</ul> : <p className="text-ink-soft">No tests yet.</p>}
      </section>
    </>
  );
}
