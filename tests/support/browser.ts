import { chromium, type Browser } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import type { Express } from 'express';

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
