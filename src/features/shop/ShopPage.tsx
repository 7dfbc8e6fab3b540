import { Link } from 'react-router';
import { EmptyState, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { useFormatters } from '../../lib/format';
import { shopModelPath } from '../../lib/navigation';
import { useShopModels } from './api';
import { PedalSketch } from './PedalSketch';

export default function ShopPage() {
  const models = useShopModels();
  const { money } = useFormatters();
  return (
    <>
      <PageHeader title="Pedals" />
      <p className="mb-6 max-w-3xl text-ink-soft">
        Each pedal is built by hand to order. Choose its clipping option — the diodes that shape the sound — after comparing how each one distorts.
      </p>
      {models.isPending ? <Loading label="Loading the pedals…" /> : null}
      {models.isError ? <ErrorState error={models.error} retry={() => models.refetch()} /> : null}
      {models.data && models.data.length === 0 ? <EmptyState title="No pedals on sale right now">New builds are on the bench; look in again soon.</EmptyState> : null}
      <ul className="grid gap-6 sm:grid-cols-2 lg:grid-cols-3">
        {models.data?.map((m) => {
          const from = m.basePriceCents + (m.options.length ? Math.min(...m.options.map((o) => o.surchargeCents)) : 0);
          return (
            <li key={m.id} className="flex flex-col overflow-hidden rounded-lg border border-spruce-700/20 bg-white">
              {m.photoUrl ? <img src={m.photoUrl} alt={`${m.name} pedal`} className="aspect-[4/3] w-full object-cover" /> : <PedalSketch label={m.name} />}
              <div className="flex flex-1 flex-col gap-2 p-4">
                <h2 className="text-xl font-bold text-spruce-900">{m.name}</h2>
                <p className="flex-1 text-ink-soft">{m.description}</p>
                <p className="font-semibold">from {money(from)} · {m.options.length} clipping {m.options.length === 1 ? 'option' : 'options'}</p>
                <Link to={shopModelPath(m.id)} className="inline-flex min-h-11 items-center justify-center rounded-md bg-copper-600 px-4 font-semibold text-white hover:bg-copper-700">
                  Compare options for {m.name}
                </Link>
              </div>
            </li>
          );
        })}
      </ul>
    </>
  );
}
