import { useState } from 'react';
import { SKILLS } from '../../../shared/schemas/catalog';
import { assemblerProfileSchema } from '../../../shared/schemas/production';
import type { PlanAssembler } from '../../../shared/production/schedule';
import { Button } from '../../components/ui/Button';
import { ErrorState, Loading } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useAssemblers, useUpdateAssembler } from './api';

const SKILL_WORDS: Record<string, string> = {
  'through-hole': 'Through-hole soldering', 'smd-rework': 'SMD and rework', 'device-matching': 'Device matching', enclosure: 'Enclosure work', 'final-check': 'Final check',
};

function AssemblerRow({ person }: { person: PlanAssembler }) {
  const update = useUpdateAssembler();
  const toast = useToast();
  const [skills, setSkills] = useState<string[]>([...person.skills]);
  const [minutes, setMinutes] = useState(String(person.dailyCapacityMinutes));
  const [error, setError] = useState<string | null>(null);
  const save = () => {
    const parsed = assemblerProfileSchema.safeParse({ skills, dailyCapacityMinutes: minutes });
    if (!parsed.success) { setError(parsed.error.issues[0].message); return; }
    setError(null);
    update.mutate({ id: person.id, ...parsed.data }, { onSuccess: () => toast(`${person.name}: ${parsed.data.dailyCapacityMinutes} min a day, ${parsed.data.skills.length} skills`), onError: (e) => toast(e.message, 'alarm') });
  };
  return (
    <li className="grid gap-2 rounded-md border border-spruce-700/20 p-3">
      <p className="font-semibold">{person.name}</p>
      <fieldset className="flex flex-wrap gap-2">
        <legend className="sr-only">Skills of {person.name}</legend>
        {SKILLS.map((s) => (
          <label key={s} className="flex min-h-11 items-center gap-2 rounded-md border border-spruce-700/20 px-2">
            <input type="checkbox" className="size-5" checked={skills.includes(s)} onChange={(e) => setSkills((xs) => (e.target.checked ? [...xs, s] : xs.filter((x) => x !== s)))} />
            {SKILL_WORDS[s] ?? s}
          </label>
        ))}
      </fieldset>
      <div className="flex flex-wrap items-end gap-2">
        <label className="flex flex-col gap-1 font-semibold">Minutes at the bench per day
          <input inputMode="numeric" value={minutes} onChange={(e) => setMinutes(e.target.value)} aria-invalid={error ? true : undefined} className="min-h-11 w-32 rounded-md border border-spruce-700/40 px-2 font-normal" />
        </label>
        <Button variant="secondary" busy={update.isPending} onClick={save}>Save {person.name.split(' ')[0]}</Button>
      </div>
      {error ? <p className="text-sm font-semibold text-alarm-700">{error}</p> : null}
    </li>
  );
}

/** Who can build what: each assembler's skills and daily minutes, which the proposed plan respects. */
export function AssemblersPanel() {
  const people = useAssemblers();
  return (
    <details className="rounded-lg bg-white p-6 shadow-sm">
      <summary className="min-h-11 cursor-pointer text-xl font-bold text-spruce-900">Assemblers: skills and daily minutes</summary>
      {people.isPending ? <Loading /> : people.isError ? <ErrorState error={people.error} retry={() => people.refetch()} /> : (
        <ul className="mt-3 grid gap-3">{people.data.map((p) => <AssemblerRow key={p.id} person={p} />)}</ul>
      )}
    </details>
  );
}
