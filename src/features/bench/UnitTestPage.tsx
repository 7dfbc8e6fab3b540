import { zodResolver } from '@hookform/resolvers/zod';
import { useState, type ChangeEvent } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { Link, useParams } from 'react-router';
import { benchTestSchema, CAPTURE_LIMITS, type BenchTestInput } from '../../../shared/schemas/production';
import { UNIT_STATE_LABELS } from '../../../shared/production/states';
import { compareWithPrediction, formatDbcLevel, predictionAtReference, type CaptureComparison, type PredictionAtReference } from '../../../shared/production/capture-check';
import { Button } from '../../components/ui/Button';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { RegenerateSheetButton, SpecSheetLink } from '../../components/spec-sheets';
import { useToast } from '../../components/ui/toast';
import { ApiError, applyFieldErrors } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useAnalyseCapture, useRecordTest, useTestUnit, type TestRecord, type UnitCaptureAnalysis } from './api';
import { ComparisonTable, SpectrumOverlay } from './CaptureComparison';
import { MainsCaution } from './MainsCaution';
import { shopFormat } from '../../lib/format';

const NO_THD = 'Enter the measured THD (%), or choose a WAV capture to read it from';

/** The verdict's sentence: what agrees, or every miss naming measurement and prediction. */
function VerdictHint({ comparison }: { comparison: CaptureComparison }) {
  return comparison.within
    ? <Notice tone="good">Within tolerance: the measurement agrees with this unit’s prediction.</Notice>
    : <Notice tone="alarm">Out of tolerance: {comparison.problems.join('; ')}. Send it back, or pass it with a reason.</Notice>;
}

/** One saved test: its figures, and with a capture the measured column beside the predicted one and the overlaid spectrum. */
function TestResult({ test, prediction }: { test: TestRecord; prediction: PredictionAtReference | null }) {
  const fmt = useFormatters();
  const comparison = prediction && test.harmonicToleranceDb !== null
    ? compareWithPrediction(prediction, { thdFPercent: test.measuredThdPercent, harmonics: test.measuredHarmonics }, { thdPercent: test.tolerancePercent, harmonicDb: test.harmonicToleranceDb })
    : null;
  const captureThd = test.capture ? (test.capture.thdFPercent ?? test.capture.thdPercent ?? test.measuredThdPercent) : null;
  return (
    <li className="rounded-lg border border-spruce-700/20 bg-white p-4">
      <p className="font-semibold">{fmt.dateTime(test.createdAt)} · {test.outcome === 'pass' ? 'Passed' : 'Sent back for rework'} by {test.testerName ?? '—'}{test.reason ? `: ${test.reason}` : ''}</p>
      <p>Current draw {shopFormat().number(test.currentDrawMa, 1)} mA · measured THD {shopFormat().number(test.measuredThdPercent, 2)} % {test.capture ? '(from the capture)' : '(typed)'} · predicted {test.predictedThdPercent == null ? '—' : shopFormat().number(test.predictedThdPercent, 2)} % (±{test.tolerancePercent} %)
        {' · '}<strong className={test.withinTolerance ? 'text-good-700' : 'text-alarm-700'}>{test.withinTolerance ? 'within tolerance' : 'out of tolerance'}</strong></p>
      {test.capture ? <p className="text-sm text-ink-soft">Capture: {shopFormat().number((test.capture.sampleRate / 1000), 1)} kHz, {test.capture.channels === 1 ? 'mono' : 'stereo'}, {shopFormat().number(test.capture.durationS, 2)} s · fundamental {shopFormat().number(test.capture.fundamentalHz, 1)} Hz · THD {captureThd == null ? '—' : shopFormat().number(captureThd, 2)} %</p> : null}
      {comparison && test.measuredHarmonics ? (
        <div className="mt-3 grid gap-4">
          <ComparisonTable comparison={comparison} caption="Predicted and measured at the reference setting" thdR={prediction ? { predicted: prediction.thdRPercent, measured: test.measuredThdRPercent } : undefined} />
          <SpectrumOverlay comparison={comparison} title="Capture overlaid on the predicted spectrum" />
        </div>
      ) : null}
    </li>
  );
}

export default function UnitTestPage() {
  const id = Number(useParams().id);
  const unit = useTestUnit(id);
  const record = useRecordTest(id);
  const analyse = useAnalyseCapture(id);
  const toast = useToast();
  // A new key gives a fresh, empty file input (how a chosen file is removed).
  const [inputKey, setInputKey] = useState(0);
  const [capture, setCapture] = useState<{ file: File; reading: UnitCaptureAnalysis | null; error: string | null } | null>(null);
  const form = useForm<BenchTestInput>({ resolver: zodResolver(benchTestSchema) as never, defaultValues: { outcome: 'pass', reason: '' } });
  const errors = form.formState.errors;
  const typedThd = useWatch({ control: form.control, name: 'measuredThdPercent' }) as unknown;
  if (unit.isPending) return <Loading />;
  if (unit.isError) return <ErrorState error={unit.error} retry={() => unit.refetch()} />;
  const d = unit.data;
  const prediction = d.unit.predicted ? predictionAtReference(d.unit.predicted) : null;
  const tolerances = { thdPercent: d.thdTolerancePercent, harmonicDb: d.harmonicToleranceDb };

  // Choosing a file analyses it at once: the tester sees the reading before deciding.
  const onChooseFile = (event: ChangeEvent<HTMLInputElement>) => {
    const file = event.target.files?.[0];
    form.clearErrors('measuredThdPercent');
    if (!file) { setCapture(null); return; }
    form.setValue('measuredThdPercent', '' as never);
    setCapture({ file, reading: null, error: null });
    analyse.mutate(file, {
      onSuccess: (reading) => setCapture((c) => (c?.file === file ? { file, reading, error: null } : c)),
      onError: (e) => setCapture((c) => (c?.file === file ? { file, reading: null, error: e instanceof ApiError && e.fields?.capture ? `${e.message}: ${e.fields.capture}` : e.message } : c)),
    });
  };
  const removeCapture = () => {
    setInputKey((k) => k + 1);
    setCapture(null);
  };

  const typedNumber = typeof typedThd === 'string' && typedThd.trim() !== '' && Number.isFinite(Number(typedThd)) ? Number(typedThd) : null;
  const comparison: CaptureComparison | null = capture?.reading?.comparison
    ?? (!capture && prediction && typedNumber !== null ? compareWithPrediction(prediction, { thdFPercent: typedNumber }, tolerances) : null);

  const onSubmit = form.handleSubmit((values) => {
    if (capture && !capture.reading) {
      form.setError('root', { message: capture.error ? 'This capture cannot be used: choose another file, or remove it and type the THD' : 'Wait for the capture to be analysed' });
      return;
    }
    if (!capture && values.measuredThdPercent === undefined) {
      form.setError('measuredThdPercent', { message: NO_THD });
      return;
    }
    const data = new FormData();
    data.append('currentDrawMa', String(values.currentDrawMa));
    if (!capture && values.measuredThdPercent !== undefined) data.append('measuredThdPercent', String(values.measuredThdPercent));
    data.append('outcome', values.outcome);
    data.append('reason', values.reason);
    if (capture) data.append('capture', capture.file);
    record.mutate(data, {
      onSuccess: (r) => {
        toast(`${d.unit.serial}: ${r.unitState === 'passed' ? 'passed' : 'sent back for rework'} with THD ${shopFormat().number(r.measuredThdPercent, 2)} % ${r.capture ? 'from the capture' : 'typed'}${r.withinTolerance ? '' : ' (out of tolerance)'}`, r.withinTolerance ? undefined : 'alarm');
        removeCapture();
      },
      onError: (e) => { applyFieldErrors(e, form.setError); if (e instanceof ApiError && e.fields?.capture) form.setError('root', { message: e.fields.capture }); toast(e.message, 'alarm'); },
    });
  });

  const reading = capture?.reading ?? null;
  const hint = `WAV only, mono or stereo, 44.1/48/96 kHz, ${CAPTURE_LIMITS.minSeconds}–${CAPTURE_LIMITS.maxSeconds} s, up to ${CAPTURE_LIMITS.maxBytes / 1048576} MB. It is analysed as soon as you choose it.`;

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
        {prediction ? <p>THD<sub>F</sub> at drive {Math.round(d.unit.referenceDrive * 100)} % with a 1 kHz tone: <strong>{shopFormat().number(prediction.thdFPercent, 2)} %</strong> (tolerance ±{d.thdTolerancePercent} % of it; each harmonic ±{d.harmonicToleranceDb} dB){d.unit.predicted?.fromMeasuredVf ? ', from the measured devices' : ', from nominal devices'}. H2 {formatDbcLevel(prediction.harmonics.find((h) => h.order === 2)?.dbc ?? -200)} · H3 {formatDbcLevel(prediction.harmonics.find((h) => h.order === 3)?.dbc ?? -200)}.</p> : <p>No prediction yet: it is computed when a capture is analysed or the test is saved.</p>}
        <p className="mt-1 text-sm text-ink-soft">Devices: {d.devices.map((x) => `${x.name} (${x.side}) ${x.measuredVf !== null ? `${shopFormat().number((x.measuredVf * 1000), 0)} mV` : 'not measured'}`).join(' · ')}. Supply {d.unit.supplyV} V DC, centre negative.</p>
      </section>
      {d.unit.state === 'built' ? (
        <form onSubmit={onSubmit} noValidate className="mb-8 grid gap-5 rounded-lg bg-white p-6 shadow-sm" aria-labelledby="bench-heading">
          <h2 id="bench-heading" className="text-xl font-bold text-spruce-900">Bench test</h2>
          <fieldset className="grid gap-3">
            <legend className="mb-1 text-lg font-semibold text-spruce-900">1. Capture</legend>
            <div className="flex flex-col gap-1">
              <label htmlFor="capture-file" className="font-semibold">WAV capture of the 1 kHz test tone at the reference setting</label>
              <div className="flex flex-wrap items-center gap-3">
                <input key={inputKey} id="capture-file" type="file" accept=".wav,audio/wav" className="min-h-11" aria-describedby="capture-hint" onChange={onChooseFile} />
                {capture ? <Button type="button" variant="secondary" onClick={removeCapture}>Remove capture</Button> : null}
              </div>
              <p id="capture-hint" className={`text-sm ${capture?.error || errors.root ? 'font-semibold text-alarm-700' : 'text-ink-soft'}`}>{capture?.error ?? errors.root?.message ?? hint}</p>
            </div>
            {capture && !reading && !capture.error ? <Loading label={`Analysing ${capture.file.name}…`} /> : null}
            {reading ? (
              <p role="status" className="rounded-md bg-spruce-100 p-3">
                <strong>Measured THD<sub>F</sub> from the capture: {shopFormat().number(reading.thdFPercent, 2)} %</strong> (THD<sub>R</sub> {shopFormat().number(reading.thdRPercent, 2)} %) · fundamental {shopFormat().number(reading.fundamentalHz, 1)} Hz at {shopFormat().number(reading.harmonics[0].amplitudeFs, 3)} of full scale · {shopFormat().number((reading.sampleRate / 1000), 1)} kHz, {reading.bitsPerSample}-bit, {reading.channels === 1 ? 'mono' : 'stereo'}, {shopFormat().number(reading.durationS, 2)} s
              </p>
            ) : null}
            {!capture ? (
              <TextField label="Measured THD at the reference setting (%), only without a capture" inputMode="decimal" autoComplete="off" error={errors.measuredThdPercent?.message} hint="From the distortion analyser, when no capture is taken. Leave it empty if you add a capture." {...form.register('measuredThdPercent')} />
            ) : null}
          </fieldset>
          {comparison ? (
            <section aria-labelledby="compare-heading" className="grid gap-4">
              <h3 id="compare-heading" className="text-lg font-semibold text-spruce-900">2. Against the prediction</h3>
              <div className="grid gap-4">
                <ComparisonTable comparison={comparison} caption={`Predicted and measured at ${Math.round(d.unit.referenceDrive * 100)} % drive`} thdR={reading ? { predicted: reading.prediction.thdRPercent, measured: reading.thdRPercent } : undefined} />
                {reading ? <SpectrumOverlay comparison={comparison} title="Capture overlaid on the predicted spectrum" /> : <p className="text-ink-soft">Without a capture only THD is compared; add a capture to compare each harmonic.</p>}
              </div>
              <VerdictHint comparison={comparison} />
            </section>
          ) : null}
          <fieldset className="grid gap-3 sm:grid-cols-2">
            <legend className="mb-1 text-lg font-semibold text-spruce-900">{comparison ? '3.' : '2.'} Verdict</legend>
            <TextField label="Current draw (mA)" inputMode="decimal" autoComplete="off" error={errors.currentDrawMa?.message} {...form.register('currentDrawMa')} />
            <div role="radiogroup" aria-label="Outcome" className="flex flex-wrap items-end gap-3">
              <label className="flex min-h-11 items-center gap-2 rounded-md border border-spruce-700/30 px-3"><input type="radio" value="pass" className="size-5" {...form.register('outcome')} /> Pass</label>
              <label className="flex min-h-11 items-center gap-2 rounded-md border border-spruce-700/30 px-3"><input type="radio" value="fail" className="size-5" {...form.register('outcome')} /> Send back for rework</label>
            </div>
            <TextField className="sm:col-span-2" label="Reason (needed to send back, or to pass out of tolerance or above the highest current draw)" error={errors.reason?.message} {...form.register('reason')} />
            <div className="sm:col-span-2"><Button type="submit" busy={record.isPending} disabled={analyse.isPending}>Save test</Button></div>
          </fieldset>
        </form>
      ) : <Notice>{d.unit.serial} is {UNIT_STATE_LABELS[d.unit.state].toLowerCase()}: nothing to test now.</Notice>}
      <section aria-labelledby="tests-heading"><h2 id="tests-heading" className="mb-2 text-xl font-bold text-spruce-900">Test records</h2>
        {d.tests.length ? <ul className="grid gap-3">{d.tests.map((t) => <TestResult key={t.id} test={t} prediction={prediction} />)}</ul> : <p className="text-ink-soft">No tests yet.</p>}
      </section>
    </>
  );
}
