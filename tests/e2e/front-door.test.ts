// The visitor's front door in a browser: `/` opens the shop, sign-in and registration lead back to
// it, and a forgotten password is replaced through the mailed link. Screenshots are kept in docs/.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import path from 'node:path';
import { anonymousAgent, startTestApp, uniqueEmail } from '../support/app';
import { launchBrowser, listen, openNav } from '../support/browser';

const DOCS = path.resolve('docs');
const t = startTestApp();
let browser: Browser;
let server: Awaited<ReturnType<typeof listen>>;

beforeAll(async () => {
  server = await listen(t.app);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  await t.stop();
});

const newPage = () => browser.newPage({ viewport: { width: 1100, height: 820 } });
const shot = (page: Page, name: string) => page.screenshot({ path: path.join(DOCS, `front-door-${name}.png`) });

describe('the front door for visitors', () => {
  it('opens the shop at /, and sign-in and registration lead back to it', async () => {
    const page = await newPage();
    await page.goto(`${server.url}/`);
    await page.waitForURL('**/shop');
    await page.getByRole('heading', { name: 'Pedals', level: 1 }).waitFor();
    await page.getByRole('link', { name: /^Compare options for / }).first().waitFor();
    await shot(page, 'shop');

    await page.getByRole('navigation', { name: 'Visitor' }).getByRole('link', { name: 'Sign in' }).click();
    await page.waitForURL('**/sign-in');
    await page.getByRole('link', { name: 'Forgot your password?' }).waitFor();
    await shot(page, 'sign-in');
    await page.getByRole('link', { name: 'Back to the pedals' }).click();
    await page.waitForURL('**/shop');

    await page.getByRole('navigation', { name: 'Visitor' }).getByRole('link', { name: 'Create account' }).click();
    await page.waitForURL('**/register');
    await page.getByRole('link', { name: 'Back to the pedals' }).click();
    await page.waitForURL('**/shop');
    await page.getByRole('heading', { name: 'Pedals', level: 1 }).waitFor();
    await page.close();
  });

  it('replaces a forgotten password through the mailed link, which then stops working', async () => {
    const email = uniqueEmail('forgot');
    const anon = await anonymousAgent(t.app);
    await anon.post('/api/auth/register').set('X-CSRF-Token', anon.csrf).send({ name: 'Juno Arkwright', email, password: 'forgotten-long-password' }).expect(202);

    const page = await newPage();
    await page.goto(`${server.url}/sign-in`);
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.waitForURL('**/forgot-password');
    await page.getByLabel('E-mail').fill(email);
    await page.getByRole('button', { name: 'Send the link' }).click();
    await expect(page.getByRole('status').textContent()).resolves.toMatch(/If that address belongs to an account/);
    await shot(page, 'forgot-password');

    // The link as mailed: the outbox row holds it until the worker sends it (no worker runs here).
    const mail = await t.knex('outbox').where({ to_address: email, template: 'password-reset' }).first();
    const link = new URL(mail.data.resetUrl as string);
    expect(link.pathname).toBe('/reset-password');
    await page.goto(`${server.url}${link.pathname}${link.search}`);
    await page.getByRole('heading', { name: 'Set a new password' }).waitFor();
    await page.getByLabel('New password').fill('password123');
    await page.getByRole('button', { name: 'Set the new password' }).click();
    await expect(page.getByText(/list of common passwords/).textContent()).resolves.toMatch(/choose another/);
    await page.getByLabel('New password').fill('remembered-long-password');
    await page.getByRole('button', { name: 'Set the new password' }).click();
    await page.getByRole('heading', { name: 'Your new password is set' }).waitFor();
    await shot(page, 'new-password');

    await page.getByRole('link', { name: 'Sign in with the new password' }).click();
    await page.waitForURL('**/sign-in');
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill('remembered-long-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/shop');
    await openNav(page);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My orders' }).waitFor();

    // The same link a second time says it is spent and offers a new one.
    const again = await newPage();
    await again.goto(`${server.url}${link.pathname}${link.search}`);
    await again.getByLabel('New password').fill('a-third-long-password');
    await again.getByRole('button', { name: 'Set the new password' }).click();
    await expect(again.getByRole('alert').textContent()).resolves.toMatch(/expired or has already been used/);
    await again.getByRole('link', { name: 'Ask for a new link' }).waitFor();
    await shot(again, 'link-used');
    await again.close();
    await page.close();
  });
});
