import { useEffect, useRef, useState } from 'react';
import type { HarmonicProfile, ProfileOptions } from '../../../shared/engine/index';
import type { ProfileRequest, ProfileResponse } from './profile-messages';

type Profile = Extract<ProfileResponse, { kind: 'profile' }>;
type AtDrive = Extract<ProfileResponse, { kind: 'at' }>;

let nextId = 1;

/** One worker per page; only the newest answer to each kind of question is kept (stale slider steps are dropped). */
function useWorker() {
  const ref = useRef<Worker | null>(null);
  useEffect(() => {
    ref.current = new Worker(new URL('./profile.worker.ts', import.meta.url), { type: 'module' });
    return () => ref.current?.terminate();
  }, []);
  return ref;
}

type Question = ProfileRequest extends infer R ? (R extends ProfileRequest ? Omit<R, 'id'> : never) : never;

function ask(worker: Worker, req: Question): Promise<ProfileResponse> {
  const id = nextId++;
  return new Promise((resolve) => {
    const onMessage = (e: MessageEvent<ProfileResponse>) => {
      if (e.data.id !== id) return;
      worker.removeEventListener('message', onMessage);
      resolve(e.data);
    };
    worker.addEventListener('message', onMessage);
    worker.postMessage({ ...req, id });
  });
}

/** The full profile of a circuit (and the contract output beside it), plus the spectrum and transfer curve at the slider's drive. */
export function useProfile(circuit: unknown, contract: unknown, drive: number) {
  const worker = useWorker();
  const [profile, setProfile] = useState<Profile | null>(null);
  const [at, setAt] = useState<AtDrive | null>(null);
  const [error, setError] = useState<string | null>(null);
  const key = JSON.stringify(circuit);
  const latestAt = useRef(0);

  useEffect(() => {
    let live = true;
    const w = worker.current;
    if (!w || !circuit) return;
    ask(w, { kind: 'profile', circuit, contract }).then((r) => {
      if (!live) return;
      if (r.kind === 'error') setError(r.message);
      else if (r.kind === 'profile') setProfile(r);
    });
    return () => { live = false; };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, worker]);

  useEffect(() => {
    const w = worker.current;
    if (!w || !circuit) return;
    const mine = ++latestAt.current;
    ask(w, { kind: 'at', circuit, drive }).then((r) => {
      if (mine !== latestAt.current) return;
      if (r.kind === 'at') setAt(r);
      else if (r.kind === 'error') setError(r.message);
    });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, drive, worker]);

  return { profile, at, error };
}

/** Several circuits' profiles at once (the compare view). */
export function useProfiles(circuits: { key: string; circuit: unknown }[]) {
  const worker = useWorker();
  const [profiles, setProfiles] = useState<Record<string, Profile>>({});
  const key = circuits.map((c) => c.key).join(',');
  useEffect(() => {
    const w = worker.current;
    if (!w) return;
    let live = true;
    for (const c of circuits) {
      ask(w, { kind: 'profile', circuit: c.circuit }).then((r) => {
        if (live && r.kind === 'profile') setProfiles((p) => ({ ...p, [c.key]: r }));
      });
    }
    return () => { live = false; };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, worker]);
  return profiles;
}

/** Outcome of one circuit's profile: computing (undefined in the record), done, or the engine's message. */
export type SummaryResult = { profile: HarmonicProfile; error: null } | { profile: null; error: string };

/**
 * Profiles of several circuits with the same options, computed in the page's worker one after another so the
 * main thread never runs the engine. Keyed by the caller's stable keys; a circuit is asked for again only
 * when its key changes (so pass a key that changes with the circuit, e.g. its JSON).
 */
export function useProfileSummaries(circuits: { key: string; circuit: unknown }[], options: ProfileOptions) {
  const worker = useWorker();
  const [results, setResults] = useState<Record<string, SummaryResult>>({});
  const key = circuits.map((c) => c.key).join('\n');
  const optionsKey = JSON.stringify(options);
  useEffect(() => {
    const w = worker.current;
    if (!w) return;
    let live = true;
    for (const c of circuits) {
      ask(w, { kind: 'summary', circuit: c.circuit, options }).then((r) => {
        if (!live) return;
        if (r.kind === 'summary') setResults((p) => ({ ...p, [c.key]: { profile: r.profile, error: null } }));
        else if (r.kind === 'error') setResults((p) => ({ ...p, [c.key]: { profile: null, error: r.message } }));
      });
    }
    return () => { live = false; };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, optionsKey, worker]);
  return results;
}
