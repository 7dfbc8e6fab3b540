// Option designer section of `npm run bench` (`npm run bench -- design` alone): the search over
// ≥ 5,000 static candidates, every one computed, in ms per candidate, from the CLI's function and in
// a browser's Web Worker (headless Debian Chromium, the built client), with the main thread's longest
// task meanwhile; and a search with an onset target. Prints figures only.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { countCandidates, designSearch, enumerateCandidates, parseDesignInput } from '../../shared/design/search';
import { clippingOnset, DEVICE_PRESETS, driveSweep, onsetDrive, type CircuitSpec } from '../../shared/engine/index';
import { DEMO, startTestApp } from '../../tests/support/app';
import { launchBrowser, listen, signIn } from '../../tests/support/browser';
import { longTasks, OBSERVE_LONG_TASKS, worst } from './client';
import type { BenchSection } from './engine';

/**
 * Every preset (9), 1…4 per side (36 strings, 36·37/2 = 666 pairs without mirror images), shunt at
 * seven E6 values and feedback, no capacitor: 666 · 8 = 5328.
 */
export const BENCH_DESIGN_INPUT = {
  toneHz: 1000, inputPeakV: 0.1, driveGain: 40, railPeakV: 4.5, temperatureC: 27, harmonics: 10,
  devices: DEVICE_PRESETS.map((p) => p.id), maxPerSide: 4, topologies: ['shunt', 'feedback'],
  seriesOhms: { eSeries: 'E6', min: 1000, max: 10000 }, feedbackOhms: 100000, groundOhms: 4700,
  target: { thdFPercent: [5, 10], h2MinusH3Db: [0, 6] }, limit: 10,
};

/** The drive control for the onset target, and the stage the browser worker draws the shortlist's curves on. */
const CONTROL = { minGain: 1, maxGain: 200, taper: 'log' } as const;
const DRIVE_STAGE = { ...CONTROL, inputPeakV: BENCH_DESIGN_INPUT.inputPeakV, railPeakV: BENCH_DESIGN_INPUT.railPeakV };
/** The same space with an onset target (the drive where THD_F passes 1 %) besides the level ranges. */
const WITH_ONSET = { ...BENCH_DESIGN_INPUT, drive: CONTROL, target: { ...BENCH_DESIGN_INPUT.target, onsetDrivePercent: [20, 40] } };

const line = (label: string, value: string) => console.log(`  ${label.padEnd(52)} ${value}`);

/** ms per candidate, wall and CPU, of one search of `input`. */
function timed(input: unknown): { wall: number; cpu: number; searched: number; zero: number; top: number } {
  const parsed = parseDesignInput(input);
  const t = performance.now();
  const cpu = process.cpuUsage();
  const r = designSearch(parsed);
  const used = process.cpuUsage(cpu);
  return {
    wall: (performance.now() - t) / r.searched, cpu: (used.user + used.system) / 1000 / r.searched, searched: r.searched,
    zero: r.candidates.filter((c) => c.distance === 0).length, top: r.candidates.length,
  };
}

function cliFigures(): number {
  const parsed = parseDesignInput(BENCH_DESIGN_INPUT);
  console.log(`\nOption designer — ${countCandidates(parsed)} static candidates, each computed (target ≤ 1 ms per candidate)`);
  // Warm-up: a small search so the JIT has seen the solver before timing.
  designSearch(parseDesignInput({ ...BENCH_DESIGN_INPUT, maxPerSide: 1, topologies: ['shunt'], seriesOhms: [2200] }));
  const runs = [timed(BENCH_DESIGN_INPUT), timed(BENCH_DESIGN_INPUT)];
  const best = runs.reduce((a, b) => (b.wall < a.wall ? b : a));
  // CPU time beside wall time: on a shared machine the wall figure includes waiting for a core.
  line('CLI function, ms per candidate (best of 2 runs)', `${best.wall.toFixed(3).padStart(9)} ms  wall, ${best.cpu.toFixed(3)} ms CPU, ${(best.wall * best.searched / 1000).toFixed(2)} s in all`);
  line('candidates at distance 0', `${String(best.zero).padStart(9)} of the top ${best.top}`);
  return best.wall;
}

function onsetFigures(): void {
  const onset = timed(WITH_ONSET);
  line('with an onset target, ms per candidate', `${onset.wall.toFixed(3).padStart(9)} ms  wall, ${onset.cpu.toFixed(3)} ms CPU, ${(onset.wall * onset.searched / 1000).toFixed(2)} s in all`);
  // The onset alone, over every 10th candidate: bisecting the 25-point sweep against walking it (as before).
  const parsed = parseDesignInput(WITH_ONSET);
  const specs: CircuitSpec[] = [];
  let i = 0;
  for (const c of enumerateCandidates(parsed.input, parsed.devices)) if (i++ % 10 === 0) specs.push({ clipper: c.clipper, toneHz: 1000, temperatureC: 27, drive: DRIVE_STAGE });
  let t = performance.now();
  const walked = specs.map((s) => clippingOnset(driveSweep(s, 25)));
  const walkMs = (performance.now() - t) / specs.length;
  t = performance.now();
  const bisected = specs.map((s) => onsetDrive(s));
  const bisectMs = (performance.now() - t) / specs.length;
  const same = walked.every((w, k) => w === bisected[k]);
  line(`onset alone, ${specs.length} circuits: whole sweep → bisection`, `${walkMs.toFixed(3).padStart(9)} ms → ${bisectMs.toFixed(3)} ms each, ${same ? 'every value equal' : 'VALUES DIFFER'}`);
}

/** The design worker's bundle in the built client (dist/assets/design.worker-HASH.js). */
function builtWorker(): string | null {
  try {
    const name = readdirSync(path.resolve('dist', 'assets')).find((f) => /^design\.worker-[\w-]+\.js$/.test(f));
    return name ? `/assets/${name}` : null;
  } catch {
    return null;
  }
}

/** Runs one search in a fresh Worker of the built bundle, from the page, and answers the worker's own timing. */
async function workerSearch(page: Page, workerUrl: string, input: unknown): Promise<{ msPerCandidate: number; searched: number }> {
  return page.evaluate(({ url, input, drive }) => new Promise<{ msPerCandidate: number; searched: number }>((resolve, reject) => {
    const w = new Worker(url, { type: 'module' });
    w.onmessage = (e: MessageEvent<{ kind: string; msPerCandidate: number; searched: number; message?: string }>) => {
      if (e.data.kind === 'done') { w.terminate(); resolve({ msPerCandidate: e.data.msPerCandidate, searched: e.data.searched }); }
      if (e.data.kind === 'error') { w.terminate(); reject(new Error(e.data.message)); }
    };
    w.postMessage({ id: 1, kind: 'run', input, drive });
  }), { url: workerUrl, input, drive: DRIVE_STAGE });
}

async function browserFigures(cliMs: number): Promise<void> {
  if (!process.env.DATABASE_URL) {
    line('in the browser', 'skipped: no database — run it through `npm run bench -- design`, which prepares one and builds the client');
    return;
  }
  const workerUrl = builtWorker();
  if (!workerUrl) { line('in the browser', 'skipped: no built client (dist/assets/design.worker-*.js)'); return; }
  const t = startTestApp();
  const server = await listen(t.app);
  const browser = await launchBrowser();
  try {
    const { models } = (await (await fetch(`${server.url}/api/models`)).json()) as { models: { id: number }[] };
    if (!models[0]) throw new Error('the bench database has no model');
    const page = await browser.newPage({ viewport: { width: 1366, height: 768 } });
    await page.addInitScript(OBSERVE_LONG_TASKS);
    await signIn(page, server.url, DEMO.owner);
    await page.goto(`${server.url}/catalog/models/${models[0].id}/design`);
    await page.getByRole('heading', { name: /Design an option/ }).waitFor();

    // The CLI's input in the page's own worker bundle: a warm-up, then the best of 2, as the CLI figure.
    await workerSearch(page, workerUrl, { ...BENCH_DESIGN_INPUT, maxPerSide: 1, topologies: ['shunt'], seriesOhms: [2200] });
    await longTasks(page);
    const runs = [await workerSearch(page, workerUrl, BENCH_DESIGN_INPUT), await workerSearch(page, workerUrl, BENCH_DESIGN_INPUT)];
    const best = runs.reduce((a, b) => (b.msPerCandidate < a.msPerCandidate ? b : a));
    line(`browser Web Worker, ms per candidate (best of 2)`, `${best.msPerCandidate.toFixed(3).padStart(9)} ms  (CLI ${cliMs.toFixed(3)} ms), ${best.searched} candidates`);
    line('  main thread meanwhile, longest task', worst(await longTasks(page)));

    // The screen's own search: the whole library, 4 per side, E6 1 k…10 k, both topologies; the
    // progress bar moves while the worker computes. Long tasks are drained while the bar shows, then
    // once the results (charts and table) are drawn.
    await page.getByLabel('Devices', { exact: true }).selectOption('library');
    await page.getByLabel('Devices in series per side, up to').fill('4');
    await page.getByLabel('Series resistor from (Ω)').fill('1000');
    await page.getByLabel('Series resistor to (Ω)').fill('10000');
    await page.getByLabel('Feedback', { exact: true }).check();
    await page.getByRole('button', { name: 'Search' }).click();
    const bar = page.getByRole('progressbar', { name: 'Candidates computed' });
    await bar.waitFor();
    const total = Number(await bar.getAttribute('max'));
    // The press of Search (the page counts the space before it starts the worker), apart from the run.
    await page.waitForTimeout(200);
    const pressed = await longTasks(page);
    const during: number[] = [];
    const results = page.getByRole('region', { name: 'Design results' });
    const started = performance.now();
    while (!(await results.isVisible())) {
      during.push(...await longTasks(page));
      if (performance.now() - started > 600_000) throw new Error('the page search did not finish in 10 minutes');
      await page.waitForTimeout(250);
    }
    const seconds = (performance.now() - started) / 1000;
    await page.waitForTimeout(300);
    const drawn = await longTasks(page);
    const summary = (await results.getByText(/candidates computed/).textContent()) ?? '';
    line(`design page, ${total} candidates (its library, from Search)`, `${seconds.toFixed(1)} s to results; page says "${summary.trim()}"`);
    line('  main thread on pressing Search, longest task', worst(pressed));
    line('  main thread while the bar moved, longest task', worst(during));
    line('  main thread drawing the results, longest task', worst(drawn));
  } finally {
    await browser.close();
    await server.close();
    await t.stop();
  }
}

async function run(): Promise<void> {
  const cliMs = cliFigures();
  onsetFigures();
  await browserFigures(cliMs);
}

export const designSection: BenchSection = { key: 'design', name: 'option designer', run };
