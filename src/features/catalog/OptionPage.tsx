import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { SpectrumBars, ThdDriveChart, TransferChart } from '../../components/charts';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { shopFormat, useFormatters } from '../../lib/format';
import { useSession } from '../auth/api';
import { useDevices, useModel, useUpdateOption, type OptionView, type StringDevice } from './api';
import { OptionForm } from './OptionForm';
import { dbc, farads, mV, ohms, percent, TOPOLOGY_LABEL, volts } from './units';
import { useProfile } from './useProfile';

function DeviceTable({ option }: { option: OptionView }) {
  const rows: (StringDevice & { side: string })[] = [
    ...option.positive.map((d) => ({ ...d, side: 'positive' })), ...option.negative.map((d) => ({ ...d, side: 'negative' })),
  ];
  return (
    <table className="w-full rounded-lg bg-white text-left shadow-sm">
      <caption className="p-2 text-left font-semibold text-spruce-900">Forward voltages of the option’s devices</caption>
      <thead className="bg-spruce-100"><tr><th className="p-2">String</th><th className="p-2">Device</th><th className="p-2">Vf at 1 mA</th><th className="p-2">Vf at 10 mA</th></tr></thead>
      <tbody>
        {rows.map((d, i) => (
          <tr key={i} className="border-t border-spruce-700/10"><td className="p-2">{d.side}</td><td className="p-2">{d.name}</td><td className="p-2">{mV(d.vfAt1mA)}</td><td className="p-2">{mV(d.vfAt10mA)}</td></tr>
        ))}
      </tbody>
    </table>
  );
}

function Profile({ option }: { option: OptionView }) {
  const [drive, setDrive] = useState(0.5);
  const { profile, at, error } = useProfile(option.engineInput?.circuit, option.engineInput?.contract, drive);
  if (!option.engineInput) return <Notice tone="alarm">This model has no active revision, so there is no drive stage to compute a profile from.</Notice>;
  if (error) return <ErrorState error={new Error(`The engine could not compute this option: ${error}`)} />;
  if (!profile) return <Loading label="Computing the harmonic profile…" />;
  const p = profile.profile;
  const onset = p.clippingOnsetDrive;
  const contract = profile.contract;
  return (
    <section aria-label="Harmonic profile" className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center gap-4 rounded-lg bg-white p-4 shadow-sm">
        <label htmlFor="drive-slider" className="font-semibold">Drive control</label>
        <input id="drive-slider" type="range" min={0} max={100} step={1} value={Math.round(drive * 100)} onChange={(e) => setDrive(Number(e.target.value) / 100)} className="h-11 min-w-64 flex-1 accent-copper-600" />
        <output htmlFor="drive-slider" className="font-mono">{Math.round(drive * 100)} % · gain ×{at ? shopFormat().number(at.gain, 1) : '…'} · THD_F {at ? percent(at.spectrum.thdF) : '…'}</output>
      </div>
      <p className="text-ink-soft">
        Clipping onset (THD_F reaches 1 %): <strong>{onset === null ? 'never within the drive range' : onset === 0 ? 'already at minimum drive' : `at ${Math.round(onset * 100)} % drive`}</strong>.
        {' '}THD_F = √(ΣV<sub>k</sub>², k≥2) / V<sub>1</sub>; THD_R = √(ΣV<sub>k</sub>², k≥2) / √(ΣV<sub>k</sub>², k≥1).
      </p>
      <div className="grid gap-4 lg:grid-cols-2">
        <SpectrumBars title="Harmonics at three drive settings" series={profile.threeDrives.map((d) => ({ label: `${Math.round(d.drive * 100)} % drive`, dbc: d.spectrum.harmonics.slice(1).map((h) => h.dbc) }))} />
        <SpectrumBars title={`Harmonics at the slider (${Math.round(drive * 100)} %)`} series={at ? [{ label: `${Math.round(drive * 100)} % drive`, dbc: at.spectrum.harmonics.slice(1).map((h) => h.dbc) }] : []} />
        <ThdDriveChart series={[{ label: option.name, points: p.sweep }]} markerDrive={drive} band={p.tolerance ? { drive: p.tolerance.drive, p5: p.tolerance.thdF.p5, p95: p.tolerance.thdF.p95 } : undefined} />
        {at?.transfer ? <TransferChart title={`Transfer curve at ${Math.round(drive * 100)} % drive`} series={[{ label: option.name, inputV: at.transfer.inputV, outputV: at.transfer.outputV }]} />
          : <Notice>No static transfer curve: the network has a capacitor, so its output depends on what came before.</Notice>}
      </div>
      <div className="grid gap-4 lg:grid-cols-2">
        {contract ? (
          <table className="w-full rounded-lg bg-white text-left shadow-sm" aria-label="Engine output at the reference setting">
            <caption className="p-2 text-left font-semibold text-spruce-900">At the reference setting ({Math.round(option.engineInput.circuit.referenceDrive! * 100)} % drive, gain ×{shopFormat().number(option.engineInput.contract.driveGain, 2)}, 1 kHz, {shopFormat().significant(option.engineInput.contract.inputPeakV * 1000)} mV peak in)</caption>
            <thead className="bg-spruce-100"><tr><th className="p-2">Harmonic</th><th className="p-2">Peak</th><th className="p-2">Level</th></tr></thead>
            <tbody>
              {contract.harmonics.map((h) => (
                <tr key={h.order} className="border-t border-spruce-700/10"><th scope="row" className="p-2 text-left">H{h.order}</th><td className="p-2 font-mono">{shopFormat().scientific(h.peakV, 3)} V</td><td className="p-2 font-mono">{shopFormat().number(h.dbc, 2)} dBc</td></tr>
              ))}
              <tr className="border-t-2 border-spruce-700/30"><th scope="row" className="p-2 text-left">THD_F</th><td className="p-2 font-mono" colSpan={2}>{shopFormat().number(contract.thdF * 100, 3)} %</td></tr>
              <tr><th scope="row" className="p-2 text-left">THD_R</th><td className="p-2 font-mono" colSpan={2}>{shopFormat().number(contract.thdR * 100, 3)} %</td></tr>
            </tbody>
          </table>
        ) : null}
        {p.tolerance ? (
          <table className="w-full self-start rounded-lg bg-white text-left shadow-sm">
            <caption className="p-2 text-left font-semibold text-spruce-900">Tolerance band over {p.tolerance.draws} simulated builds (device spread, 5 % resistors)</caption>
            <thead className="bg-spruce-100"><tr><th className="p-2">Figure</th><th className="p-2">P5</th><th className="p-2">P50</th><th className="p-2">P95</th></tr></thead>
            <tbody>
              <tr><th scope="row" className="p-2 text-left">THD_F</th>{(['p5', 'p50', 'p95'] as const).map((k) => <td key={k} className="p-2 font-mono">{percent(p.tolerance!.thdF[k])}</td>)}</tr>
              <tr className="border-t border-spruce-700/10"><th scope="row" className="p-2 text-left">H2</th>{(['p5', 'p50', 'p95'] as const).map((k) => <td key={k} className="p-2 font-mono">{dbc(p.tolerance!.h2Dbc[k])}</td>)}</tr>
              <tr className="border-t border-spruce-700/10"><th scope="row" className="p-2 text-left">H3</th>{(['p5', 'p50', 'p95'] as const).map((k) => <td key={k} className="p-2 font-mono">{dbc(p.tolerance!.h3Dbc[k])}</td>)}</tr>
            </tbody>
          </table>
        ) : null}
      </div>
      <p className="text-sm text-ink-soft">Output level at the reference setting: {volts(p.reference.spectrum.fundamentalPeakV)} peak fundamental.</p>
    </section>
  );
}

export default function OptionPage() {
  const params = useParams();
  const modelId = Number(params.modelId);
  const optionId = Number(params.optionId);
  const model = useModel(modelId);
  const devices = useDevices();
  const role = useSession().data?.role;
  const canEdit = role === 'owner' || role === 'planner';
  const [editing, setEditing] = useState(false);
  const update = useUpdateOption(optionId);
  const toast = useToast();
  const { money } = useFormatters();
  if (model.isPending) return <Loading />;
  if (model.isError) return <ErrorState error={model.error} retry={() => model.refetch()} />;
  const option = model.data.options.find((o) => o.id === optionId);
  if (!option) return <ErrorState error={new Error('This model has no such clipping option')} />;
  const n = option.network;
  return (
    <>
      <PageHeader title={`${model.data.name} — ${option.name}`}>
        <Link to={`/catalog/models/${modelId}`} className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold text-spruce-800 underline">Back to {model.data.name}</Link>
        <Link to={`/catalog/models/${modelId}/compare?options=${option.id}`} className="inline-flex min-h-11 items-center rounded-md px-4 font-semibold text-spruce-800 underline">Compare with others</Link>
      </PageHeader>
      <div className="flex flex-col gap-6">
        {option.flags.length ? <Notice tone="alarm">Cannot be built from stock as it stands: {option.flags.join('; ')}.</Notice> : null}
        <dl className="grid gap-x-6 gap-y-2 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-3">
          <div><dt className="text-sm text-ink-soft">Code · status</dt><dd className="font-semibold">{option.code} · {option.published ? 'published' : 'not published'}</dd></div>
          <div><dt className="text-sm text-ink-soft">Topology</dt><dd className="font-semibold">{TOPOLOGY_LABEL[option.topology]}</dd></div>
          <div><dt className="text-sm text-ink-soft">Network</dt><dd className="font-semibold">{option.topology === 'shunt' ? `series ${ohms(n.seriesOhms ?? 2200)}, shunt cap ${farads(n.shuntFarads ?? 0)}` : `Rf ${ohms(n.feedbackOhms ?? 1e5)}, Rg ${ohms(n.groundOhms ?? 4700)}, cap ${farads(n.feedbackFarads ?? 0)}`}</dd></div>
          <div><dt className="text-sm text-ink-soft">Surcharge</dt><dd className="font-semibold">{money(option.surchargeCents)}</dd></div>
          <div><dt className="text-sm text-ink-soft">Device parts per unit</dt><dd className="font-semibold">{option.bomDelta.map((l) => `${l.quantity} × ${l.partNumber}`).join(', ') || 'none linked'} ({money(option.deviceCents)})</dd></div>
          <div><dt className="text-sm text-ink-soft">Unit cost with this option</dt><dd className="font-semibold">{option.costCents === null ? '—' : money(option.costCents)}</dd></div>
        </dl>
        {option.description ? <p className="text-lg">{option.description}</p> : null}
        <DeviceTable option={option} />
        <Profile option={option} />
        {canEdit ? (
          <section className="rounded-lg bg-white p-4 shadow-sm">
            {editing && devices.data ? (
              <OptionForm devices={devices.data} initial={option} busy={update.isPending} submitLabel="Save option" onSubmit={(input, form) => update.mutate(input, {
                onSuccess: () => { setEditing(false); toast(`${input.name} saved`); },
                onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
              })} />
            ) : <button type="button" className="min-h-11 font-semibold text-spruce-800 underline" onClick={() => setEditing(true)}>Edit this option</button>}
          </section>
        ) : null}
      </div>
    </>
  );
}
