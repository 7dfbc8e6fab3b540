// Client section of `npm run bench -- client`: the storefront model page's longest main-thread task
// (PerformanceObserver 'longtask', Chromium's own 50 ms threshold) on load and while a customer clicks
// through it, and how soon the staff option page draws its charts on a warm visit. Headless Debian
// Chromium against the real app on the bench database. Prints figures only (targets: no long task over
// 50 ms on the storefront model page; staff charts within 300 ms warm).
import type { Page } from 'playwright-core';
import { DEMO, DEMO_PASSWORD, startTestApp } from '../../tests/support/app';
import { launchBrowser, listen } from '../../tests/support/browser';
import type { BenchSection } from './engine';

interface ShopModel { id: number; name: string; options: { id: number; name: string }[] }

/** Records every long task of the page from its first script on, into window.__longTasks. */
export const OBSERVE_LONG_TASKS = `
  window.__longTasks = [];
  new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__longTasks.push(e.duration); })
    .observe({ type: 'longtask', buffered: true });
`;

/** The long tasks recorded since the last call (and clears them). */
export async function longTasks(page: Page): Promise<number[]> {
  return page.evaluate(() => (window as unknown as { __longTasks: number[] }).__longTasks.splice(0));
}

/** The longest of some long tasks, e.g. "72 ms (3 over 50 ms)", or "none". */
export const worst = (xs: number[]): string => (xs.length === 0 ? 'none' : `${Math.max(...xs).toFixed(0)} ms (${xs.length} over 50 ms)`);

async function signIn(page: Page, url: string, email: string): Promise<void> {
  await page.goto(`${url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.endsWith('/sign-in'));
}

async function storefront(page: Page, url: string, model: ShopModel): Promise<void> {
  for (const visit of ['cold', 'warm']) {
    await page.goto(`${url}/shop/${model.id}`);
    await page.getByRole('group', { name: 'Choose a clipping option' }).waitFor();
    // Ready when every option card shows its figures (the worker has answered for each).
    await page.waitForFunction((n) => document.querySelectorAll('fieldset dl').length >= n, model.options.length, { timeout: 60_000 });
    const ready = await page.evaluate(() => performance.now());
    await page.waitForTimeout(300);
    const load = await longTasks(page);
    for (const o of model.options) {
      await page.getByRole('radio', { name: new RegExp(o.name) }).check();
    }
    await page.getByLabel('Quantity').fill('3');
    const slider = page.getByLabel(/^Drive/);
    for (const v of ['0.2', '0.4', '0.6', '0.8']) await slider.fill(v);
    await page.waitForTimeout(300);
    const clicks = await longTasks(page);
    console.log(`  storefront model page (${visit}, ${model.options.length} options): figures ready at ${ready.toFixed(0)} ms; longest task on load ${worst(load)}; while clicking, typing and dragging drive ${worst(clicks)}`);
  }
}

async function staffOption(page: Page, url: string, model: ShopModel): Promise<void> {
  const option = model.options[0];
  const chartsDrawn = () => page.waitForFunction(() => {
    const section = document.querySelector('section[aria-label="Harmonic profile"]');
    return section !== null && section.querySelectorAll('canvas').length >= 3;
  }, undefined, { timeout: 60_000, polling: 'raf' });
  for (const visit of ['cold', 'warm', 'warm']) {
    await page.goto(`${url}/catalog/models/${model.id}/options/${option.id}`);
    await chartsDrawn();
    const ms = await page.evaluate(() => performance.now());
    const tasks = await longTasks(page);
    console.log(`  staff option page (${visit}, ${option.name}): charts drawn ${ms.toFixed(0)} ms after navigation start; longest task ${worst(tasks)}`);
  }
}

async function runClientBench(): Promise<void> {
  console.log('\nClient (headless Chromium; long tasks from PerformanceObserver; targets: none over 50 ms on the storefront model page, staff charts ≤ 300 ms warm)');
  if (!process.env.DATABASE_URL) {
    console.log('  skipped: no database — run it through `npm run bench -- client`, which prepares one and builds the client');
    return;
  }
  const t = startTestApp();
  const server = await listen(t.app);
  const browser = await launchBrowser();
  try {
    const { models } = (await (await fetch(`${server.url}/api/models`)).json()) as { models: ShopModel[] };
    const model = [...models].sort((a, b) => b.options.length - a.options.length)[0];
    if (!model) throw new Error('the bench database has no model on sale');
    const customer = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await customer.addInitScript(OBSERVE_LONG_TASKS);
    await signIn(customer, server.url, DEMO.customer);
    await storefront(customer, server.url, model);
    const owner = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await owner.addInitScript(OBSERVE_LONG_TASKS);
    await signIn(owner, server.url, DEMO.owner);
    await staffOption(owner, server.url, model);
  } finally {
    await browser.close();
    await server.close();
    await t.stop();
  }
}

export const clientSection: BenchSection = { key: 'client', name: 'client', run: runClientBench };
