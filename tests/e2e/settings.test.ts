import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import path from 'node:path';
import { DEMO, DEMO_PASSWORD, startTestApp } from '../support/app';
import { launchBrowser, listen } from '../support/browser';

// The owner's settings screen in a browser; its screenshot is kept in docs/.
const DOCS = path.resolve(import.meta.dirname, '..', '..', 'docs');
const t = startTestApp();
let browser: Browser;
let server: Awaited<ReturnType<typeof listen>>;
let before: { shop_name: string; vat_id: string };

beforeAll(async () => {
  before = await t.knex('settings').where({ id: 1 }).first('shop_name', 'vat_id');
  server = await listen(t.app);
  browser = await launchBrowser();
});
afterAll(async () => {
  await t.knex('settings').where({ id: 1 }).update(before);
  await browser?.close();
  await server?.close();
  await t.stop();
});

describe('the owner’s settings screen', () => {
  it('shows every section, says a bad value beside its field, saves, and the storefront shows the new name', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(DEMO.owner);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/board');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Shop settings' }).click();
    await page.getByRole('heading', { name: 'Shop settings' }).waitFor();
    for (const name of ['Shop identity', 'Numbers and formatting', 'Tax', 'Shipping zones', 'Carriers', 'Bench and quality', 'Recent changes']) {
      await page.getByRole('heading', { name, exact: true }).waitFor();
    }
    await expect(page.getByLabel('Shop name').inputValue()).resolves.toBe(before.shop_name);
    await expect(page.getByLabel('Fast-step check (%)').inputValue()).resolves.toBe('25');

    // A bad VAT id is refused beside the field, and nothing is saved.
    await page.getByLabel('VAT id').fill('12');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('A VAT id is a country code and 2 to 13 letters or digits').waitFor();
    expect((await t.knex('settings').where({ id: 1 }).first('vat_id')).vat_id).toBe(before.vat_id);

    await page.getByLabel('VAT id').fill('DE111222333');
    await page.getByLabel('Shop name').fill('Hollowmere Effects Werkstatt');
    await page.getByRole('button', { name: 'Save settings' }).click();
    await page.getByText('Settings saved').waitFor();
    expect(await t.knex('settings').where({ id: 1 }).first('shop_name', 'vat_id')).toEqual({ shop_name: 'Hollowmere Effects Werkstatt', vat_id: 'DE111222333' });
    // The change is listed with who made it.
    await page.getByRole('table', { name: 'Recent changes to the settings' }).getByText('shopName').first().waitFor();
    await page.screenshot({ path: path.join(DOCS, 'settings-screen.png'), fullPage: true });

    // A visitor's storefront carries the shop's name, not the software's.
    const visitor = await browser.newPage();
    await visitor.goto(`${server.url}/shop`);
    await visitor.getByText('Hollowmere Effects Werkstatt').first().waitFor();
    expect(await visitor.getByRole('banner').textContent()).not.toContain('Kneepoint');
    await visitor.close();
    await page.close();
  });
});
