import { UNIT_STATE_LABELS, type UnitState } from '../../../shared/production/states';
import { Ident } from '../ui/Ident';
import { ErrorState, Loading } from '../ui/states';
import { useOrderSheets } from './api';
import { SpecSheetLink } from './SpecSheetLink';

/** An order's pedals by serial, each with its spec sheet once it has passed its bench test. */
export function OrderSpecSheets({ orderId }: { orderId: number }) {
  const units = useOrderSheets(orderId);
  if (units.isPending) return <Loading label="Looking up your pedals…" />;
  if (units.isError) return <ErrorState error={units.error} retry={() => void units.refetch()} />;
  if (units.data.length === 0) return null;
  return (
    <ul aria-label="Pedals and their spec sheets" className="mt-3 grid gap-2">
      {units.data.map((u) => (
        <li key={u.serial} className="flex flex-wrap items-center justify-between gap-3 rounded-md border border-spruce-700/20 bg-white p-3">
          <div>
            <p className="text-copper-700"><Ident mono>{u.serial}</Ident></p>
            <p className="text-sm text-ink-soft">{u.modelName} — {u.optionName} · {UNIT_STATE_LABELS[u.state as UnitState] ?? u.state}</p>
          </div>
          {u.sheetReady
            ? <SpecSheetLink serial={u.serial} label={`Spec sheet ${u.serial} (PDF)`} />
            : <p className="text-sm text-ink-soft">Spec sheet once it passes its bench test</p>}
        </li>
      ))}
    </ul>
  );
}
