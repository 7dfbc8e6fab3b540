import { zodResolver } from '@hookform/resolvers/zod';
import { useForm, useWatch } from 'react-hook-form';
import { SOLDERING_CAUTION } from '../../../shared/catalog/cautions';
import { buildStepSchema, SKILLS, type BuildStepInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { EmptyState } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useAddStep, useDeleteStep, type Revision } from './api';
import { EditStep } from './EditDialogs';

const SKILL_LABEL: Record<(typeof SKILLS)[number], string> = {
  'through-hole': 'Through-hole soldering', 'smd-rework': 'SMD and rework', 'device-matching': 'Device matching', enclosure: 'Enclosure work', 'final-check': 'Final check',
};

function AddStep({ revisionId }: { revisionId: number }) {
  const add = useAddStep(revisionId);
  const toast = useToast();
  const blank = { title: '', instructions: '', standardMinutes: 10, skill: 'through-hole' as const, soldering: false, safetyNote: '' };
  const form = useForm<BuildStepInput>({ resolver: zodResolver(buildStepSchema) as never, defaultValues: blank });
  const e = form.formState.errors;
  const soldering = useWatch({ control: form.control, name: 'soldering' });
  return (
    <form noValidate className="grid gap-3 rounded-lg bg-white p-4 shadow-sm sm:grid-cols-3" onSubmit={form.handleSubmit((input) => add.mutate(input, {
      onSuccess: () => { toast(`Step “${input.title}” added`); form.reset(blank); },
      onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
    }))}>
      <h3 className="text-lg font-bold text-spruce-900 sm:col-span-3">Add a build step</h3>
      <TextField label="Step title" error={e.title?.message} {...form.register('title')} />
      <TextField label="Standard minutes" type="number" error={e.standardMinutes?.message} {...form.register('standardMinutes', { valueAsNumber: true })} />
      <div className="flex flex-col gap-1">
        <label htmlFor="step-skill" className="font-semibold">Skill</label>
        <select id="step-skill" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('skill')}>
          {SKILLS.map((s) => <option key={s} value={s}>{SKILL_LABEL[s]}</option>)}
        </select>
      </div>
      <div className="flex flex-col gap-1 sm:col-span-2">
        <label htmlFor="step-instructions" className="font-semibold">Instructions</label>
        <textarea id="step-instructions" rows={2} className="rounded-md border border-spruce-700/40 p-2" {...form.register('instructions')} />
      </div>
      <label className="flex min-h-11 items-center gap-3 font-semibold"><input type="checkbox" className="size-6" {...form.register('soldering')} /> Involves soldering</label>
      {soldering ? <p className="rounded-md bg-copper-100 p-2 text-sm sm:col-span-3">This caution is added to the step: {SOLDERING_CAUTION}</p> : null}
      <div><Button type="submit" busy={add.isPending}>Add step</Button></div>
    </form>
  );
}

export function BuildSteps({ revision, editable }: { revision: Revision; editable: boolean }) {
  const remove = useDeleteStep();
  const toast = useToast();
  const total = revision.steps.reduce((a, s) => a + s.standardMinutes, 0);
  return (
    <section className="flex flex-col gap-3">
      <h2 className="text-xl font-bold text-spruce-900">Build steps ({revision.steps.length}, {total} standard minutes)</h2>
      {revision.steps.length === 0 ? <EmptyState title="No build steps yet" /> : (
        <ol className="flex flex-col gap-2">
          {revision.steps.map((s) => (
            <li key={s.id} className="rounded-lg bg-white p-4 shadow-sm">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <p className="font-semibold">{s.position}. {s.title} <span className="font-normal text-ink-soft">· {s.standardMinutes} min · {SKILL_LABEL[s.skill as keyof typeof SKILL_LABEL] ?? s.skill}</span></p>
                {editable ? <div className="flex gap-2"><EditStep step={s} /><ConfirmButton label="Remove" question={`Remove step ${s.position}, “${s.title}”?`} confirmLabel="Remove step" onConfirm={() => remove.mutate(s.id, { onSuccess: () => toast(`Step “${s.title}” removed`), onError: (err) => toast(err.message, 'alarm') })} /></div> : null}
              </div>
              {s.instructions ? <p className="mt-1">{s.instructions}</p> : null}
              {s.safetyNote ? <p className="mt-2 rounded-md border-l-4 border-amber-400 bg-copper-100 p-2 text-sm"><strong>Caution: </strong>{s.safetyNote}</p> : null}
            </li>
          ))}
        </ol>
      )}
      {editable ? <AddStep revisionId={revision.id} /> : null}
    </section>
  );
}
