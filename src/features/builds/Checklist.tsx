import { SOLDERING_CAUTION } from '../../../shared/catalog/cautions';
import { Button } from '../../components/ui/Button';
import { useToast } from '../../components/ui/toast';
import { useStep, type UnitDetail } from './api';

/** What a step's safety note says beyond the standard soldering caution (shown once, above it). */
const extraNote = (note: string | null) => (note ?? '').replace(SOLDERING_CAUTION, '').trim();

/** The revision's build steps, in order, each with start and finish and its safety note. */
export function Checklist({ unitId, steps, open }: { unitId: number; steps: UnitDetail['steps']; open: boolean }) {
  const step = useStep(unitId);
  const toast = useToast();
  return (
    <ol className="grid gap-3">
      {steps.map((s) => (
        <li key={s.id} className={`rounded-lg border p-4 ${s.finishedAt ? 'border-good-700/40 bg-good-100/50' : 'border-spruce-700/20 bg-white'}`}>
          <div className="flex flex-wrap items-start justify-between gap-3">
            <div className="max-w-2xl">
              <h3 className="text-lg font-bold">{s.position}. {s.title}</h3>
              <p className="mt-1">{s.instructions}</p>
              {s.soldering ? (
                <p className="mt-2 rounded-md border border-amber-400 bg-amber-400/15 p-2 text-sm font-semibold">{SOLDERING_CAUTION}</p>
              ) : null}
              {extraNote(s.safetyNote) ? <p className="mt-2 text-sm font-semibold text-alarm-700">{extraNote(s.safetyNote)}</p> : null}
              <p className="mt-2 text-sm text-ink-soft">Standard {s.standardMinutes} min{s.actualMinutes !== null ? ` · took ${s.actualMinutes.toFixed(1)} min` : ''} · skill: {s.skill}</p>
            </div>
            {open ? (
              <div className="flex gap-2">
                {!s.startedAt ? <Button variant="secondary" busy={step.isPending} onClick={() => step.mutate({ stepId: s.id, action: 'start' }, { onSuccess: () => toast(`Started “${s.title}”`), onError: (e) => toast(e.message, 'alarm') })}>Start step {s.position}</Button> : null}
                {s.startedAt && !s.finishedAt ? <Button busy={step.isPending} onClick={() => step.mutate({ stepId: s.id, action: 'finish' }, { onSuccess: (r) => toast(`Finished “${s.title}” in ${r.actualMinutes?.toFixed(1)} min (standard ${r.standardMinutes} min)`), onError: (e) => toast(e.message, 'alarm') })}>Finish step {s.position}</Button> : null}
                {s.finishedAt ? <span className="font-semibold text-good-700">Done</span> : null}
              </div>
            ) : null}
          </div>
        </li>
      ))}
    </ol>
  );
}
