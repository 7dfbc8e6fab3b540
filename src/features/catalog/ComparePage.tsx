import { useMemo, useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router';
import { SpectrumBars, ThdDriveChart } from '../../components/charts';
import { ErrorState, Loading, Notice, PageHeader } from '../../components/ui/states';
import { useModel } from './api';
import { dbc, percent } from './units';
import { useProfiles } from './useProfile';

/** 2–4 options of one model on the same axes: THD_F against drive and the harmonics at the nearest sweep point to the slider. */
export default function ComparePage() {
  const id = Number(useParams().id);
  const model = useModel(id);
  const [search, setSearch] = useSearchParams();
  const [drive, setDrive] = useState(0.5);
  const chosen = (search.get('options') ?? '').split(',').map(Number).filter(Boolean);
  const options = model.data?.options ?? [];
  const selected = (chosen.length ? options.filter((o) => chosen.includes(o.id)) : options.slice(0, 3)).slice(0, 4);
  const circuits = useMemo(() => selected.filter((o) => o.engineInput).map((o) => ({ key: String(o.id), circuit: o.engineInput!.circuit })), [selected]);
  const profiles = useProfiles(circuits);
  if (model.isPending) return <Loading />;
  if (model.isError) return <ErrorState error={model.error} retry={() => model.refetch()} />;
  const toggle = (optionId: number) => {
    const ids = selected.map((o) => o.id);
    const next = ids.includes(optionId) ? ids.filter((x) => x !== optionId) : [...ids, optionId].slice(-4);
    setSearch({ options: next.join(',') });
  };
  const ready = selected.filter((o) => profiles[String(o.id)]);
  const nearest = (o: (typeof selected)[number]) => {
    const sweep = profiles[String(o.id)].profile.sweep;
    return sweep.reduce((best, p) => (Math.abs(p.drive - drive) < Math.abs(best.drive - drive) ? p : best), sweep[0]);
  };
  return (
    <>
      <PageHeader title={`Compare clipping options — ${model.data.name}`}>
        <Link to={`/catalog/models/${id}`} className="inline-flex min-h-11 items-center px-4 font-semibold text-spruce-800 underline">Back to {model.data.name}</Link>
      </PageHeader>
      <div className="flex flex-col gap-4">
        <fieldset className="flex flex-wrap gap-4 rounded-lg bg-white p-4 shadow-sm">
          <legend className="px-1 font-semibold">Options on the charts (2 to 4)</legend>
          {options.map((o) => (
            <label key={o.id} className="flex min-h-11 items-center gap-2"><input type="checkbox" className="size-6" checked={selected.some((s) => s.id === o.id)} onChange={() => toggle(o.id)} /> {o.name}</label>
          ))}
        </fieldset>
        {selected.length < 2 ? <Notice>Choose at least two options to compare.</Notice> : null}
        <div className="flex flex-wrap items-center gap-4 rounded-lg bg-white p-4 shadow-sm">
          <label htmlFor="compare-drive" className="font-semibold">Drive control</label>
          <input id="compare-drive" type="range" min={0} max={100} value={Math.round(drive * 100)} onChange={(e) => setDrive(Number(e.target.value) / 100)} className="h-11 min-w-64 flex-1 accent-copper-600" />
          <output htmlFor="compare-drive" className="font-mono">{Math.round(drive * 100)} %</output>
        </div>
        {ready.length < selected.length ? <Loading label="Computing profiles…" /> : null}
        <div className="grid gap-4 lg:grid-cols-2">
          <ThdDriveChart series={ready.map((o) => ({ label: o.name, points: profiles[String(o.id)].profile.sweep }))} markerDrive={drive} />
          <SpectrumBars title={`H2–H7 near ${Math.round(drive * 100)} % drive`} series={ready.map((o) => ({ label: o.name, dbc: nearest(o).harmonicsDbc }))} />
        </div>
        <table className="w-full rounded-lg bg-white text-left shadow-sm">
          <caption className="p-2 text-left font-semibold text-spruce-900">Side by side at the reference setting</caption>
          <thead className="bg-spruce-100"><tr><th className="p-2">Option</th><th className="p-2">THD_F</th><th className="p-2">H2</th><th className="p-2">H3</th><th className="p-2">Clipping onset</th></tr></thead>
          <tbody>{ready.map((o) => {
            const p = profiles[String(o.id)].profile;
            const h = p.reference.spectrum.harmonics;
            return (
              <tr key={o.id} className="border-t border-spruce-700/10"><th scope="row" className="p-2 text-left">{o.name}</th><td className="p-2">{percent(p.reference.spectrum.thdF)}</td>
                <td className="p-2">{dbc(h[1].dbc)}</td><td className="p-2">{dbc(h[2].dbc)}</td>
                <td className="p-2">{p.clippingOnsetDrive === null ? 'never' : `${Math.round(p.clippingOnsetDrive * 100)} % drive`}</td></tr>
            );
          })}</tbody>
        </table>
      </div>
    </>
  );
}
