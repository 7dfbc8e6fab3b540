// Build steps of a revision: ordered, standard minutes, skill; soldering steps always carry the caution.
import type { Knex } from 'knex';
import { SOLDERING_CAUTION } from '../../../shared/catalog/cautions';
import type { BuildStepInput } from '../../../shared/schemas/catalog';
import { notFound } from '../../errors';
import { getRevision, lockEditable } from './revisions';

function row(input: BuildStepInput) {
  const note = input.safetyNote.trim();
  // A soldering step without the caution would reach the bench without it: add it rather than trust the form.
  const safety = input.soldering && !note.includes(SOLDERING_CAUTION) ? [SOLDERING_CAUTION, note].filter(Boolean).join('\n') : note;
  return { title: input.title, instructions: input.instructions, standard_minutes: input.standardMinutes, skill: input.skill, soldering: input.soldering, safety_note: safety };
}

export async function addStep(knex: Knex, revisionId: number, input: BuildStepInput) {
  await knex.transaction(async (trx) => {
    await lockEditable(trx, revisionId);
    const [{ max }] = await trx('build_steps').where({ revision_id: revisionId }).max<{ max: number | null }[]>('position as max');
    await trx('build_steps').insert({ revision_id: revisionId, position: (max ?? 0) + 1, ...row(input) });
  });
  return getRevision(knex, revisionId);
}

export async function updateStep(knex: Knex, stepId: number, input: BuildStepInput) {
  const step = await knex('build_steps').where({ id: stepId }).first('revision_id');
  if (!step) throw notFound('No such build step');
  await knex.transaction(async (trx) => {
    await lockEditable(trx, step.revision_id);
    await trx('build_steps').where({ id: stepId }).update(row(input));
  });
  return getRevision(knex, step.revision_id);
}

export async function deleteStep(knex: Knex, stepId: number) {
  const step = await knex('build_steps').where({ id: stepId }).first('revision_id', 'position');
  if (!step) throw notFound('No such build step');
  await knex.transaction(async (trx) => {
    await lockEditable(trx, step.revision_id);
    await trx('build_steps').where({ id: stepId }).delete();
    // Close the gap in two passes so the (revision, position) unique key never clashes mid-update.
    await trx('build_steps').where({ revision_id: step.revision_id }).where('position', '>', step.position).update({ position: trx.raw('-position') });
    await trx('build_steps').where({ revision_id: step.revision_id }).where('position', '<', 0).update({ position: trx.raw('-position - 1') });
  });
  return getRevision(knex, step.revision_id);
}
