import { useEffect, useMemo, useRef, useState } from 'react';
import type { CircuitSpec } from '../../../shared/engine';
import { Button } from '../ui/Button';
import { PreviewPlayer } from './player';
import type { CurvesRequest, CurvesResponse } from './preview.worker';
import { withoutCapacitors } from './shaper';

export interface PreviewOption {
  id: number;
  name: string;
  /** The option on the model's drive stage, as shared/catalog/circuit.ts builds it. */
  circuit: CircuitSpec;
}

interface Props {
  options: PreviewOption[];
  /** Drive control rotation 0…1. */
  drive: number;
  onDriveChange: (drive: number) => void;
}

/**
 * The options' curves and matched gains at a drive, from a worker of the component's own (only the newest
 * answer is kept while the drive moves); null until the first answer.
 */
function usePreviewCurves(options: PreviewOption[], drive: number) {
  const worker = useRef<Worker | null>(null);
  const asked = useRef(0);
  const [result, setResult] = useState<{ curves: Float32Array[]; gains: number[] } | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    const w = new Worker(new URL('./preview.worker.ts', import.meta.url), { type: 'module' });
    w.onmessage = (e: MessageEvent<CurvesResponse>) => {
      if (e.data.id !== asked.current) return;
      if ('error' in e.data) setError(e.data.error);
      else setResult({ curves: e.data.curves, gains: e.data.gains });
    };
    worker.current = w;
    return () => { w.terminate(); worker.current = null; };
  }, []);
  useEffect(() => {
    const id = ++asked.current;
    worker.current?.postMessage({ id, circuits: options.map((o) => o.circuit), drive } satisfies CurvesRequest);
  }, [options, drive]);
  return { result, error };
}

/**
 * Plays a plucked-string phrase through the options' clipping curves (from the engine), with an
 * A/B switch and loudness matched between options so the louder one does not win.
 */
export function ListeningPreview({ options, drive, onDriveChange }: Props) {
  const player = useRef<PreviewPlayer | null>(null);
  const [playing, setPlaying] = useState(false);
  const [pair, setPair] = useState<[number, number]>([0, Math.min(1, options.length - 1)]);
  const [side, setSide] = useState<0 | 1>(0);
  const [level, setLevel] = useState(0);
  const [error, setError] = useState<string | null>(null);
  const [peakSeen, setPeakSeen] = useState(0);

  const { result: shaped, error: curveError } = usePreviewCurves(options, drive);
  const smoothed = useMemo(() => options.some((o) => withoutCapacitors(o.circuit).dropped), [options]);
  const heard = pair[side];

  useEffect(() => {
    if (playing && shaped) player.current?.update(shaped.curves, shaped.gains);
  }, [shaped, playing]);
  useEffect(() => {
    if (playing) player.current?.select(heard);
  }, [heard, playing]);
  useEffect(() => {
    if (!playing) return;
    let frame = 0;
    const tick = () => {
      const now = player.current?.level() ?? 0;
      setPeakSeen((p) => Math.max(p, now));
      setLevel(now);
      frame = requestAnimationFrame(tick);
    };
    frame = requestAnimationFrame(tick);
    return () => cancelAnimationFrame(frame);
  }, [playing]);
  useEffect(() => () => void player.current?.close(), []);

  async function toggle() {
    setError(null);
    try {
      if (playing) {
        player.current?.stop();
        setPlaying(false);
        setLevel(0);
        return;
      }
      if (!shaped) return;
      player.current ??= new PreviewPlayer();
      await player.current.start(shaped.curves, shaped.gains, heard);
      setPlaying(true);
    } catch {
      setError('This browser could not start audio. Check that sound is allowed for this page.');
    }
  }

  if (options.length === 0) return null;
  return (
    <section aria-labelledby="listen-heading" className="rounded-lg border border-spruce-700/20 bg-white p-5">
      <h2 id="listen-heading" className="text-xl font-bold text-spruce-900">Listen before you choose</h2>
      <p className="mt-1 text-ink-soft">
        A short plucked-string phrase played through each option&apos;s clipping, computed from its diodes. Levels are matched, so
        neither option sounds better just by being louder.
      </p>
      <div className="mt-4 grid gap-4 md:grid-cols-2">
        {[0, 1].map((s) => (
          <div key={s} className="flex flex-col gap-1">
            <label htmlFor={`listen-${s}`} className="font-semibold">{s === 0 ? 'A' : 'B'}</label>
            <select
              id={`listen-${s}`}
              value={pair[s]}
              className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3"
              onChange={(e) => setPair((p) => (s === 0 ? [Number(e.target.value), p[1]] : [p[0], Number(e.target.value)]))}
            >
              {options.map((o, i) => <option key={o.id} value={i}>{o.name}</option>)}
            </select>
          </div>
        ))}
      </div>
      <div className="mt-4 flex flex-wrap items-center gap-3">
        <Button type="button" onClick={toggle} aria-pressed={playing} disabled={!shaped && !playing}>{playing ? 'Stop' : 'Play'}</Button>
        <div role="radiogroup" aria-label="Option heard" className="inline-flex overflow-hidden rounded-md border border-spruce-700/40">
          {[0, 1].map((s) => (
            <button
              key={s}
              type="button"
              role="radio"
              aria-checked={side === s}
              onClick={() => setSide(s as 0 | 1)}
              className={`min-h-11 min-w-24 px-4 font-semibold ${side === s ? 'bg-spruce-900 text-white' : 'bg-white text-spruce-900'}`}
            >
              Hear {s === 0 ? 'A' : 'B'}
            </button>
          ))}
        </div>
        <span className="text-ink-soft">Now: <strong className="text-ink">{options[heard]?.name}</strong></span>
      </div>
      <div className="mt-4 flex flex-col gap-1">
        <label htmlFor="listen-drive" className="font-semibold">Drive <span className="num font-normal text-ink-soft">{Math.round(drive * 100)} %</span></label>
        <input id="listen-drive" type="range" min={0} max={1} step={0.01} value={drive} onChange={(e) => onDriveChange(Number(e.target.value))} className="h-11 accent-copper-600" />
      </div>
      <div className="mt-2 flex items-center gap-3">
        <label htmlFor="listen-level" className="text-sm text-ink-soft">Output level</label>
        <meter id="listen-level" min={0} max={0.5} value={level} data-peak-seen={peakSeen.toFixed(4)} className="h-3 w-40" />
      </div>
      {smoothed ? (
        <p className="mt-3 text-sm text-ink-soft">
          The preview uses each option&apos;s static clipping curve; the treble smoothing of a capacitor across the diodes is shown in
          the charts but not heard here.
        </p>
      ) : null}
      {error ?? curveError ? <p role="alert" className="mt-3 font-semibold text-alarm-700">{error ?? `The preview could not be computed: ${curveError}`}</p> : null}
    </section>
  );
}
