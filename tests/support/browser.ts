import { chromium, type Browser, type BrowserContextOptions, type Page } from 'playwright-core';
import { afterAll, beforeAll, expect } from 'vitest';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';
import { DEMO_PASSWORD, startTestApp } from './app';

export const SCREENSHOTS = path.resolve('test-results');

/** Debian's Chromium, headless, with the flags this machine needs. Playwright gives every launch a fresh, empty profile directory of its own. */
export async function launchBrowser(): Promise<Browser> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  return chromium.launch({
    executablePath: process.env.KP_BROWSER ?? '/usr/bin/chromium',
    args: [
      '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync',
    ],
  });
}

/** Serves the app (with the built client in dist/) on an ephemeral loopback port. */
export async function listen(app: Express) {
  const server = app.listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  const { port } = server.address() as AddressInfo;
  return { url: `http://127.0.0.1:${port}`, close: () => new Promise((resolve) => server.close(resolve)) };
}

/** Where a browser test's app runs: the test app, its URL, and one headless Chromium. */
export interface BrowserApp {
  t: ReturnType<typeof startTestApp>;
  url: string;
  browser: Browser;
}

/**
 * The usual start of a browser test: the app on a real port (wrapped by `wrap`, e.g. to serve a client
 * built elsewhere), one Chromium, and all three closed after the file's tests. `env` may be a function,
 * read when the app starts: for settings known only then, such as a fake started in an earlier beforeAll.
 */
export function useBrowserApp(options: { env?: Record<string, string> | (() => Record<string, string>); wrap?: (app: Express) => Express } = {}): BrowserApp {
  const env = {} as BrowserApp;
  let server: Awaited<ReturnType<typeof listen>> | undefined;
  beforeAll(async () => {
    env.t = startTestApp(typeof options.env === 'function' ? options.env() : options.env);
    server = await listen(options.wrap ? options.wrap(env.t.app) : env.t.app);
    env.url = server.url;
    env.browser = await launchBrowser();
  });
  afterAll(async () => {
    await env.browser?.close();
    await server?.close();
    await env.t?.stop();
  });
  return env;
}

/**
 * Signs in on the sign-in page as a demo account and waits until the app has left that page; with
 * `home`, until it has arrived there (the page the account's role starts on, e.g. '/board').
 */
export async function signIn(page: Page, baseUrl: string, email: string, options: { home?: string; password?: string } = {}) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(options.password ?? DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  if (options.home) await page.waitForURL(`**${options.home}`);
  else await page.waitForURL((u) => !u.pathname.endsWith('/sign-in'));
}

/** A new page in the file's browser (Playwright's page options: viewport, hasTouch, acceptDownloads…), signed in as `email` (see signIn). */
export async function signedInPage(app: BrowserApp, email: string, { home, ...pageOptions }: BrowserContextOptions & { home?: string }) {
  const page = await app.browser.newPage(pageOptions);
  await signIn(page, app.url, email, { home });
  return page;
}

/** Below desktop width the shell folds its navigation behind "Menu": opens it when it is folded (a no-op on a desktop). */
export async function openNav(page: Page) {
  const menu = page.getByRole('button', { name: 'Menu' });
  const nav = page.getByRole('navigation', { name: 'Main' });
  // The shell shows one of the two once the page has loaded.
  await expect.poll(async () => (await menu.isVisible()) || (await nav.isVisible()), { timeout: 30_000 }).toBe(true);
  if (await menu.isVisible() && (await menu.getAttribute('aria-expanded')) !== 'true') await menu.click();
}
