// Runs the option designer's search off the main thread: thousands of candidates, each computed by the
// engine, so the page stays responsive. The search yields every 64 candidates, which lets a cancel in.
import { designSearchAsync, parseDesignInput } from '../../../shared/design/search';
import { driveSweep, errorBody, type DriveStage } from '../../../shared/engine/index';
import type { DesignRequest, DesignResponse } from './design-messages';

const running = new Map<number, { aborted: boolean }>();
const post = (r: DesignResponse) => self.postMessage(r);

async function run(id: number, input: unknown, drive: DriveStage): Promise<void> {
  const signal = { aborted: false };
  running.set(id, signal);
  try {
    const parsed = parseDesignInput(input);
    const t = performance.now();
    const result = await designSearchAsync(parsed, { signal, progressEvery: 64, onProgress: (done, total) => post({ id, kind: 'progress', done, total }) });
    const msPerCandidate = (performance.now() - t) / Math.max(1, result.searched);
    // THD against drive for the shortlist only: 13 points each, on the revision's own drive stage.
    const candidates = result.candidates.map((c) => ({ ...c, sweep: driveSweep({ clipper: c.clipper, drive, toneHz: parsed.input.toneHz }, 13) }));
    post({ id, kind: 'done', searched: result.searched, total: result.total, cancelled: result.cancelled, msPerCandidate, candidates });
  } catch (err) {
    post({ id, kind: 'error', ...errorBody(err) });
  } finally {
    running.delete(id);
  }
}

self.onmessage = (e: MessageEvent<DesignRequest>) => {
  const req = e.data;
  if (req.kind === 'cancel') {
    const s = running.get(req.id);
    if (s) s.aborted = true;
    return;
  }
  void run(req.id, req.input, req.drive as DriveStage);
};
