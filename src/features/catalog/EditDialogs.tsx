import { zodResolver } from '@hookform/resolvers/zod';
import { useRef } from 'react';
import { useForm } from 'react-hook-form';
import { bomLineSchema, buildStepSchema, SKILLS, type BomLineInput, type BuildStepInput } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { applyFieldErrors } from '../../lib/api';
import { useUpdateBomLine, useUpdateStep, type BomLine, type Step } from './api';

/** Edit one BOM line in a modal dialog (tap-friendly: no hover-only controls). */
export function EditBomLine({ line }: { line: BomLine }) {
  const dialog = useRef<HTMLDialogElement>(null);
  const update = useUpdateBomLine();
  const toast = useToast();
  const form = useForm<BomLineInput>({ resolver: zodResolver(bomLineSchema) as never, defaultValues: { partId: line.partId, quantity: line.quantity, designators: line.designators, notes: line.notes, needsLot: line.needsLot } });
  const e = form.formState.errors;
  return (
    <>
      <Button variant="secondary" onClick={() => dialog.current?.showModal()}>Edit</Button>
      <dialog ref={dialog} aria-label={`Edit ${line.partNumber}`} className="m-auto w-full max-w-lg rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
        <form noValidate className="flex flex-col gap-3" onSubmit={(ev) => void form.handleSubmit((input) => update.mutate({ ...input, id: line.id }, {
          onSuccess: () => { dialog.current?.close(); toast(`${line.partNumber} line saved`); },
          onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
        }))(ev)}>
          <h2 className="text-lg font-bold">{line.partNumber} — {line.value}</h2>
          <TextField label="Quantity" type="number" error={e.quantity?.message} {...form.register('quantity', { valueAsNumber: true })} />
          <TextField label="Designators" error={e.designators?.message} {...form.register('designators')} />
          <TextField label="Notes" error={e.notes?.message} {...form.register('notes')} />
          <label className="flex min-h-11 items-center gap-3 font-semibold"><input type="checkbox" className="size-6" {...form.register('needsLot')} /> Assembler records the part lot</label>
          <div className="flex justify-end gap-2"><Button type="button" variant="secondary" onClick={() => dialog.current?.close()}>Cancel</Button><Button type="submit" busy={update.isPending}>Save line</Button></div>
        </form>
      </dialog>
    </>
  );
}

export function EditStep({ step }: { step: Step }) {
  const dialog = useRef<HTMLDialogElement>(null);
  const update = useUpdateStep();
  const toast = useToast();
  const form = useForm<BuildStepInput>({ resolver: zodResolver(buildStepSchema) as never, defaultValues: { title: step.title, instructions: step.instructions, standardMinutes: step.standardMinutes, skill: step.skill as BuildStepInput['skill'], soldering: step.soldering, safetyNote: step.safetyNote } });
  const e = form.formState.errors;
  return (
    <>
      <Button variant="secondary" onClick={() => dialog.current?.showModal()}>Edit</Button>
      <dialog ref={dialog} aria-label={`Edit step ${step.position}`} className="m-auto w-full max-w-xl rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
        <form noValidate className="flex flex-col gap-3" onSubmit={(ev) => void form.handleSubmit((input) => update.mutate({ ...input, id: step.id }, {
          onSuccess: () => { dialog.current?.close(); toast(`Step “${input.title}” saved`); },
          onError: (err) => { applyFieldErrors(err, form.setError); toast(err.message, 'alarm'); },
        }))(ev)}>
          <TextField label="Step title" error={e.title?.message} {...form.register('title')} />
          <TextField label="Standard minutes" type="number" error={e.standardMinutes?.message} {...form.register('standardMinutes', { valueAsNumber: true })} />
          <div className="flex flex-col gap-1"><label htmlFor={`step-skill-${step.id}`} className="font-semibold">Skill</label>
            <select id={`step-skill-${step.id}`} className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-2" {...form.register('skill')}>{SKILLS.map((s) => <option key={s} value={s}>{s}</option>)}</select></div>
          <div className="flex flex-col gap-1"><label htmlFor={`step-instr-${step.id}`} className="font-semibold">Instructions</label>
            <textarea id={`step-instr-${step.id}`} rows={3} className="rounded-md border border-spruce-700/40 p-2" {...form.register('instructions')} /></div>
          <div className="flex flex-col gap-1"><label htmlFor={`step-safety-${step.id}`} className="font-semibold">Safety note</label>
            <textarea id={`step-safety-${step.id}`} rows={3} className="rounded-md border border-spruce-700/40 p-2" {...form.register('safetyNote')} /></div>
          <label className="flex min-h-11 items-center gap-3 font-semibold"><input type="checkbox" className="size-6" {...form.register('soldering')} /> Involves soldering (the soldering caution is kept)</label>
          <div className="flex justify-end gap-2"><Button type="button" variant="secondary" onClick={() => dialog.current?.close()}>Cancel</Button><Button type="submit" busy={update.isPending}>Save step</Button></div>
        </form>
      </dialog>
    </>
  );
}
