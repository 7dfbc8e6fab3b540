import { useMemo, useState } from 'react';
import { assessPlan, PLAN_EXPLAINED, type PlannedBuild } from '../../../shared/production/schedule';
import { Button } from '../../components/ui/Button';
import { useFormatters } from '../../lib/format';
import type { BatchUnit, PlanProposal } from './api';

/**
 * The proposed plan as a load chart (one row per assembler, one column per working day, bars
 * filled to the day's capacity), with every build adjustable before it is applied. Overloaded
 * days and builds after their due date are marked in words as well as colour.
 */
export function PlanEditor({ proposal, units, busy, onApply, onCancel }: { proposal: PlanProposal; units: BatchUnit[]; busy: boolean; onApply: (b: PlannedBuild[]) => void; onCancel: () => void }) {
  const [builds, setBuilds] = useState<PlannedBuild[]>(proposal.builds);
  const assessed = useMemo(() => assessPlan(builds, proposal.jobs, proposal.assemblers), [builds, proposal]);
  const days = [...new Set(assessed.load.map((l) => l.date))].sort();
  const fmt = useFormatters();
  const serial = new Map(units.map((u) => [u.id, u.serial]));
  const late = new Set(assessed.late);
  const change = (unitId: number, patch: Partial<PlannedBuild>) => setBuilds((bs) => bs.map((b) => (b.unitId === unitId ? { ...b, ...patch } : b)));
  const overloaded = assessed.load.filter((l) => l.overloaded).length;

  return (
    <div className="grid gap-4 rounded-lg border border-copper-600/40 bg-paper p-4">
      <h3 className="text-lg font-bold text-spruce-900">Proposed plan from {fmt.date(proposal.startDate)}</h3>
      <p className="text-ink-soft">{PLAN_EXPLAINED}</p>
      <div className="overflow-x-auto">
        <table className="border-collapse text-sm">
          <caption className="sr-only">Load per assembler per day</caption>
          <thead><tr><th scope="col" className="px-2 py-1 text-left">Assembler</th>{days.map((d) => <th key={d} scope="col" className="px-2 py-1 whitespace-nowrap">{fmt.day(d)}</th>)}</tr></thead>
          <tbody>
            {proposal.assemblers.map((a) => (
              <tr key={a.id}>
                <th scope="row" className="px-2 py-1 text-left font-semibold">{a.name}</th>
                {days.map((d) => {
                  const cell = assessed.load.find((l) => l.assemblerId === a.id && l.date === d);
                  const share = cell && cell.capacityMinutes > 0 ? Math.min(1, cell.minutes / cell.capacityMinutes) : 0;
                  return (
                    <td key={d} className="px-2 py-1">
                      <div className={`relative h-11 w-28 overflow-hidden rounded border ${cell?.overloaded ? 'border-alarm-700 bg-alarm-100' : 'border-spruce-700/30 bg-white'}`}>
                        <div className={`absolute inset-y-0 left-0 ${cell?.overloaded ? 'bg-alarm-700/40' : 'bg-spruce-700/30'}`} style={{ width: `${share * 100}%` }} />
                        <span className="relative block px-1 pt-2 text-center font-semibold">{cell ? `${cell.minutes}/${cell.capacityMinutes} min${cell.overloaded ? ' · over' : ''}` : '—'}</span>
                      </div>
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {overloaded || late.size ? <p role="status" className="font-semibold text-alarm-700">{overloaded} overloaded day(s), {late.size} build(s) after their due date.</p> : <p role="status" className="font-semibold text-good-700">No overloaded days; every build is on time.</p>}
      {proposal.unassignable.length ? <p className="font-semibold text-alarm-700">{proposal.unassignable.length} unit(s) need a skill nobody has: assign them by hand once someone is trained.</p> : null}
      <details>
        <summary className="min-h-11 cursor-pointer py-2 font-semibold">Adjust single builds ({builds.length})</summary>
        <ul className="grid gap-2">
          {builds.map((b) => (
            <li key={b.unitId} className={`flex flex-wrap items-center gap-2 ${late.has(b.unitId) ? 'text-alarm-700' : ''}`}>
              <span className="w-40 font-mono text-sm">{serial.get(b.unitId)}</span>
              <select aria-label={`Builder of ${serial.get(b.unitId)}`} value={b.assemblerId} onChange={(e) => change(b.unitId, { assemblerId: Number(e.target.value) })} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2">
                {proposal.assemblers.map((a) => <option key={a.id} value={a.id}>{a.name}</option>)}
              </select>
              <input type="date" aria-label={`Day of ${serial.get(b.unitId)}`} value={b.date} onChange={(e) => change(b.unitId, { date: e.target.value })} className="min-h-11 rounded-md border border-spruce-700/40 px-2" />
              {late.has(b.unitId) ? <span className="font-semibold">after due date</span> : null}
            </li>
          ))}
        </ul>
      </details>
      <div className="flex gap-2">
        <Button busy={busy} disabled={!builds.length} onClick={() => onApply(builds)}>Apply plan</Button>
        <Button variant="secondary" onClick={onCancel}>Discard</Button>
      </div>
    </div>
  );
}
