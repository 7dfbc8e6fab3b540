import { useMemo, useState } from 'react';
import { Link, useParams } from 'react-router';
import { ListeningPreview } from '../../components/listening/ListeningPreview';
import { Button } from '../../components/ui/Button';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { shopFormat, useFormatters } from '../../lib/format';
import { paths } from '../../lib/navigation';
import { useShopModel, type ShopOption } from './api';
import { cart, MAX_PER_LINE } from './cart';
import { HarmonicBars, Legend, OPTION_COLOURS, ThdCurves } from './charts';
import { HarmonicsExplainer } from './HarmonicsExplainer';
import { dbcOf, describeProfile, useOptionProfiles } from './profiles';

const NO_OPTIONS: ShopOption[] = [];
const percent = (ratio: number) => `${shopFormat().number(ratio * 100, ratio < 0.1 ? 1 : 0)} %`;
const dbc = (v: number | null) => (v === null ? 'none (below −100 dBc)' : `${shopFormat().number(v, 1)} dBc`);

export default function ModelPage() {
  const modelId = Number(useParams().modelId);
  const model = useShopModel(modelId);
  const { money } = useFormatters();
  const toast = useToast();
  const [chosen, setChosen] = useState<number | null>(null);
  const [quantity, setQuantity] = useState(1);
  const [drive, setDrive] = useState<number | null>(null);
  const options = model.data?.options ?? NO_OPTIONS;
  const profiles = useOptionProfiles(options);
  // Built once per model, so the preview's memoised curves are not recomputed on every click or keystroke.
  const previewOptions = useMemo(
    () => options.flatMap((o) => (o.engineInput ? [{ id: o.id, name: o.name, circuit: o.engineInput.circuit }] : [])),
    [options],
  );

  if (model.isPending) return <Loading label="Loading the pedal…" />;
  if (model.isError) return <ErrorState error={model.error} retry={() => model.refetch()} />;
  const m = model.data;
  const reference = m.activeRevision?.drive.referenceDrive ?? 0.5;
  const shownDrive = drive ?? reference;
  const selected = m.options.find((o) => o.id === chosen) ?? null;

  const addToCart = () => {
    if (!selected) return;
    cart.add({ modelId: m.id, optionId: selected.id, quantity, label: `${m.name} — ${selected.name}` });
    toast(`Added ${quantity} × ${m.name} with ${selected.name} to your cart`);
  };

  return (
    <>
      <PageHeader title={m.name}>
        <Link to={paths.shop} className="inline-flex min-h-11 items-center font-semibold text-copper-700 underline">All pedals</Link>
      </PageHeader>
      <div className={`mb-6 grid gap-6 ${m.photoUrl ? 'md:grid-cols-[2fr_3fr]' : ''}`}>
        {m.photoUrl ? <img src={m.photoUrl} alt={`${m.name} pedal`} className="w-full rounded-lg object-cover" /> : null}
        <div>
          <p className="max-w-3xl text-lg text-ink">{m.description}</p>
          <p className="mt-3 text-ink-soft">Runs from 9 V DC, centre-negative. The figures below are computed from each option’s diodes with a 1 kHz test tone at {Math.round(reference * 100)} % drive.</p>
        </div>
      </div>

      {m.options.length === 0 ? <EmptyState title="No clipping options on sale for this pedal yet" /> : (
        <form onSubmit={(e) => { e.preventDefault(); addToCart(); }} className="flex flex-col gap-6">
          <fieldset className="grid gap-4 md:grid-cols-2 xl:grid-cols-3">
            <legend className="mb-3 text-xl font-bold text-spruce-900">Choose a clipping option</legend>
            {profiles.map(({ option: o, profile, error }, i) => (
              <label key={o.id} className={`flex cursor-pointer flex-col gap-2 rounded-lg border-2 bg-white p-4 ${chosen === o.id ? 'border-copper-600' : 'border-spruce-700/20'}`}>
                <span className="flex items-center gap-3">
                  <input type="radio" name="option" value={o.id} checked={chosen === o.id} onChange={() => setChosen(o.id)} className="size-6 accent-copper-600" />
                  <span aria-hidden className="inline-block size-3 rounded-sm" style={{ background: OPTION_COLOURS[i % OPTION_COLOURS.length] }} />
                  <span className="text-lg font-semibold">{o.name}</span>
                  <span className="ml-auto font-semibold">{money(m.basePriceCents + o.surchargeCents)}</span>
                </span>
                <span className="text-ink-soft">{o.description}</span>
                {profile ? (
                  <>
                    <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
                      <dt className="text-ink-soft">THD</dt><dd className="num font-semibold">{percent(profile.reference.spectrum.thdF)}</dd>
                      <dt className="text-ink-soft">2nd harmonic</dt><dd className="num">{dbc(dbcOf(profile, 2))}</dd>
                      <dt className="text-ink-soft">3rd harmonic</dt><dd className="num">{dbc(dbcOf(profile, 3))}</dd>
                      <dt className="text-ink-soft">Even share</dt><dd className="num">{percent(profile.reference.spectrum.evenEnergyShare)}</dd>
                    </dl>
                    <span className="text-sm">{describeProfile(profile)}</span>
                  </>
                ) : <span className="text-sm text-ink-soft">{error ?? 'Computing this option’s harmonics…'}</span>}
              </label>
            ))}
          </fieldset>

          <section aria-labelledby="compare-heading" className="rounded-lg border border-spruce-700/20 bg-white p-5">
            <h2 id="compare-heading" className="text-xl font-bold text-spruce-900">The options side by side</h2>
            <Legend profiles={profiles} />
            <div className="mt-3 grid gap-6 lg:grid-cols-2">
              <figure>
                <figcaption className="mb-1 font-semibold">Harmonics at {Math.round(reference * 100)} % drive (dBc, higher is louder)</figcaption>
                <HarmonicBars profiles={profiles} />
              </figure>
              <figure>
                <figcaption className="mb-1 font-semibold">THD as the drive control turns (dashed line: {Math.round(shownDrive * 100)} %)</figcaption>
                <ThdCurves profiles={profiles} drive={shownDrive} />
              </figure>
            </div>
          </section>

          <HarmonicsExplainer />

          {/* Listening preview slot: the shared player from src/components/listening, fed each option's engine circuit. */}
          {previewOptions.length > 0 ? <ListeningPreview options={previewOptions} drive={shownDrive} onDriveChange={setDrive} /> : null}

          <div className="flex flex-wrap items-end gap-4 rounded-lg border border-spruce-700/20 bg-spruce-100 p-4">
            <label className="flex flex-col gap-1 font-semibold">
              Quantity
              <input type="number" min={1} max={MAX_PER_LINE} value={quantity} onChange={(e) => setQuantity(Math.max(1, Math.min(MAX_PER_LINE, Number(e.target.value) || 1)))} className="min-h-11 w-24 rounded-md border border-spruce-700/40 bg-white px-3" />
            </label>
            <Button type="submit" disabled={!selected}>{selected ? `Add ${m.name} with ${selected.name} to cart` : 'Choose an option to add it to the cart'}</Button>
          </div>
        </form>
      )}
    </>
  );
}
