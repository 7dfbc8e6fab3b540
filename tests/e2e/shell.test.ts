import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { DEMO } from '../support/app';
import { SCREENSHOTS, signIn, useBrowserApp } from '../support/browser';

const EXPECTED_NAV: Record<keyof typeof DEMO, { home: string; nav: string[] }> = {
  owner: { home: '/board', nav: ['Production board', 'Batches', 'Shipping', 'Parts & stock', 'Clipping devices', 'Device trays', 'Pedal models', 'Orders', 'Sent mail', 'People & roles', 'Shop settings', 'My account'] },
  planner: { home: '/board', nav: ['Production board', 'Batches', 'Shipping', 'Parts & stock', 'Clipping devices', 'Device trays', 'Pedal models', 'Orders', 'Sent mail', 'My account'] },
  assembler: { home: '/builds', nav: ['My builds', 'Parts & stock', 'Clipping devices', 'Device trays', 'Pedal models', 'My account'] },
  tester: { home: '/bench', nav: ['Test bench', 'Parts & stock', 'Clipping devices', 'Device trays', 'Pedal models', 'My account'] },
  customer: { home: '/shop', nav: ['Pedals', 'Cart', 'My orders', 'My account'] },
};

const env = useBrowserApp();

describe('the app shell in a browser', () => {
  for (const role of Object.keys(EXPECTED_NAV) as (keyof typeof DEMO)[]) {
    it(`signs in as ${role}, lands on its start page and sees its navigation`, async () => {
      const page = await env.browser.newPage({ viewport: { width: 1280, height: 800 } });
      await signIn(page, env.url, DEMO[role]);
      await page.waitForURL(`**${EXPECTED_NAV[role].home}`);
      // The start page is lazy: the shell shows once its code has loaded.
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
      const links = await page.getByRole('navigation', { name: 'Main' }).getByRole('link').allTextContents();
      expect(links).toEqual(EXPECTED_NAV[role].nav);
      await page.screenshot({ path: path.join(SCREENSHOTS, `shell-${role}.png`) });
      await page.getByRole('button', { name: 'Sign out' }).first().click();
      await page.waitForURL('**/sign-in');
      await page.close();
    });
  }

  it('says a failed sign-in in words and stays on the page', async () => {
    const page = await env.browser.newPage();
    await page.goto(`${env.url}/sign-in`);
    await page.getByLabel('E-mail').fill(DEMO.owner);
    await page.getByLabel('Password').fill('wrong password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByRole('alert').textContent()).resolves.toMatch(/do not match/);
    expect(page.url()).toMatch(/\/sign-in$/);
    await page.close();
  });

  it('shows a page-not-found page for an unknown address', async () => {
    const page = await env.browser.newPage();
    await page.goto(`${env.url}/no/such/page`);
    // The page is a lazy route: wait for it to load instead of checking at once.
    await page.getByRole('heading', { name: 'Page not found' }).waitFor();
    await expect(page.getByRole('heading', { name: 'Page not found' }).isVisible()).resolves.toBe(true);
    await page.close();
  });
});
