import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { reopenStepSchema, type ReopenStepInput } from '../../../shared/schemas/production';
import { SOLDERING_CAUTION } from '../../../shared/catalog/cautions';
import { Button } from '../../components/ui/Button';
import { Dialog } from '../../components/ui/Dialog';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { ApiError, applyFieldErrors } from '../../lib/api';
import { useReopenStep, useStep, type UnitDetail } from './api';
import { shopFormat } from '../../lib/format';

type Step = UnitDetail['steps'][number];
interface Caution { id: string; name: string; text: string }

/** What a step's safety note says beyond the standard soldering caution. */
const extraNote = (note: string | null) => (note ?? '').replace(SOLDERING_CAUTION, '').trim();

/**
 * The build's cautions, each kind once: the soldering caution if any step solders, then each
 * distinct extra safety note. Steps refer to them by name instead of repeating the text.
 */
export function buildCautions(steps: Step[]) {
  const cautions: Caution[] = [];
  const ofStep = new Map<number, Caution[]>();
  const soldering: Caution = { id: 'caution-soldering', name: 'Soldering', text: SOLDERING_CAUTION };
  for (const s of steps) {
    const mine: Caution[] = [];
    if (s.soldering) {
      if (!cautions.includes(soldering)) cautions.push(soldering);
      mine.push(soldering);
    }
    const note = extraNote(s.safetyNote);
    if (note) {
      let caution = cautions.find((c) => c.text === note);
      if (!caution) {
        caution = { id: `caution-${cautions.length + 1}`, name: `Note ${cautions.filter((c) => c !== soldering).length + 1}`, text: note };
        cautions.push(caution);
      }
      mine.push(caution);
    }
    ofStep.set(s.id, mine);
  }
  return { cautions, ofStep };
}

function Cautions({ cautions }: { cautions: Caution[] }) {
  if (!cautions.length) return null;
  return (
    <aside aria-labelledby="cautions-heading" className="mb-4 rounded-lg border-2 border-amber-400 bg-amber-400/15 p-4">
      <h3 id="cautions-heading" className="mb-2 text-lg font-bold">Cautions for this build</h3>
      <ul className="grid gap-2">
        {cautions.map((c) => <li key={c.id} id={c.id} className="font-semibold"><span className="mr-2 rounded bg-amber-400 px-2 py-0.5 text-sm">{c.name}</span>{c.text}</li>)}
      </ul>
    </aside>
  );
}

/** Why a finished step is reopened, through the same schema the server applies. */
function ReopenForm({ unitId, step, onDone }: { unitId: number; step: Step; onDone: () => void }) {
  const reopen = useReopenStep(unitId);
  const toast = useToast();
  const form = useForm<ReopenStepInput>({ resolver: zodResolver(reopenStepSchema), defaultValues: { reason: '' } });
  const submit = form.handleSubmit((values) => reopen.mutate({ stepId: step.id, reason: values.reason }, {
    onSuccess: () => { toast(`Step ${step.position} is open again; its time starts now`); onDone(); },
    onError: (e) => { applyFieldErrors(e, form.setError); if (!(e instanceof ApiError && e.fields)) form.setError('reason', { message: e.message }); },
  }));
  return (
    <form onSubmit={submit} noValidate className="grid gap-3">
      <p>“{step.title}” goes back to in progress, its time starts again now, and the reason is kept in the unit’s history.</p>
      <TextField label="Why reopen it?" error={form.formState.errors.reason?.message} autoFocus {...form.register('reason')} />
      <div className="flex flex-wrap justify-end gap-2">
        <Button type="button" variant="secondary" onClick={onDone}>Keep it finished</Button>
        <Button type="submit" busy={reopen.isPending}>Reopen step</Button>
      </div>
    </form>
  );
}

/** The revision's build steps, in order: start, finish (confirmed when far under the standard time) and reopen with a reason. */
export function Checklist({ unitId, steps, open, fastStepPercent }: { unitId: number; steps: Step[]; open: boolean; fastStepPercent: number }) {
  const step = useStep(unitId);
  const toast = useToast();
  const { cautions, ofStep } = buildCautions(steps);
  const [fast, setFast] = useState<{ step: Step; message: string } | null>(null);
  const [reopening, setReopening] = useState<Step | null>(null);

  const finish = (s: Step, confirmFast = false) => step.mutate({ stepId: s.id, action: 'finish', confirmFast }, {
    onSuccess: (r) => { setFast(null); toast(`Finished “${s.title}” in ${r.actualMinutes == null ? '—' : shopFormat().number(r.actualMinutes, 1)} min (standard ${r.standardMinutes} min)`); },
    onError: (e) => (e instanceof ApiError && e.code === 'fast_step' ? setFast({ step: s, message: e.message }) : toast(e.message, 'alarm')),
  });
  return (
    <>
      <Cautions cautions={cautions} />
      <ol className="grid gap-3">
        {steps.map((s) => (
          <li key={s.id} className={`rounded-lg border p-4 ${s.finishedAt ? 'border-good-700/40 bg-good-100/50' : 'border-spruce-700/20 bg-white'}`}>
            <div className="flex flex-wrap items-start justify-between gap-3">
              <div className="max-w-2xl flex-1">
                <h3 className="text-lg font-bold">{s.position}. {s.title}</h3>
                <p className="mt-1">{s.instructions}</p>
                {ofStep.get(s.id)?.length ? (
                  <p className="mt-2 flex flex-wrap items-center gap-2 text-sm font-semibold">
                    <span>Caution:</span>
                    {ofStep.get(s.id)!.map((c) => <span key={c.id} className="rounded bg-amber-400/60 px-2 py-0.5">{c.name}</span>)}
                    <span className="font-normal text-ink-soft">(see Cautions for this build)</span>
                  </p>
                ) : null}
                <p className="mt-2 text-sm text-ink-soft">Standard {s.standardMinutes} min{s.actualMinutes !== null ? ` · took ${shopFormat().number(s.actualMinutes, 1)} min` : ''} · skill: {s.skill}</p>
              </div>
              {open ? (
                <div className="flex flex-wrap items-center gap-2">
                  {!s.startedAt ? <Button variant="secondary" busy={step.isPending} onClick={() => step.mutate({ stepId: s.id, action: 'start' }, { onSuccess: () => toast(`Started “${s.title}”`), onError: (e) => toast(e.message, 'alarm') })}>Start step {s.position}</Button> : null}
                  {s.startedAt && !s.finishedAt ? <Button busy={step.isPending} onClick={() => finish(s)}>Finish step {s.position}</Button> : null}
                  {s.finishedAt ? (
                    <>
                      <span className="font-semibold text-good-700">Done</span>
                      <Button variant="quiet" onClick={() => setReopening(s)}>Reopen step {s.position}</Button>
                    </>
                  ) : null}
                </div>
              ) : s.finishedAt ? <span className="font-semibold text-good-700">Done</span> : null}
            </div>
          </li>
        ))}
      </ol>
      <Dialog open={fast !== null} title="Finished already?" onClose={() => setFast(null)}>
        <p className="mb-2">{fast?.message}.</p>
        <p className="mb-4 text-ink-soft">Steps finished in under {fastStepPercent} % of their standard time are checked, in case of a mis-tap. Finishing it is noted in the unit’s history.</p>
        <div className="flex flex-wrap justify-end gap-2">
          <Button variant="secondary" onClick={() => setFast(null)}>Not yet: keep working</Button>
          <Button busy={step.isPending} onClick={() => fast && finish(fast.step, true)}>Yes, step {fast?.step.position} is finished</Button>
        </div>
      </Dialog>
      <Dialog open={reopening !== null} title={`Reopen step ${reopening?.position ?? ''}?`} onClose={() => setReopening(null)}>
        {reopening ? <ReopenForm unitId={unitId} step={reopening} onDone={() => setReopening(null)} /> : null}
      </Dialog>
    </>
  );
}
