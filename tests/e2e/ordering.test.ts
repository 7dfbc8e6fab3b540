import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { DECLINED } from '../../server/fakes/payments/flow';
import { startPaymentsFake, type PaymentsFake } from '../../server/fakes/payments/index';
import { PAYMENT_FAILURE_SENTENCES } from '../../server/services/payments/shopper-messages';
import { startJobs } from '../../server/jobs/boss';
import { outboxJob } from '../../server/jobs/outbox-worker';
import { DEMO, DEMO_PASSWORD, startTestApp } from '../support/app';
import { launchBrowser, SCREENSHOTS } from '../support/browser';

// A customer compares options, orders and pays on the payments fake's hosted page, in Chromium;
// the receipt must arrive at the mail fake through the outbox worker.
const SECRET = 'whsec_kneepoint_e2e';
let payments: PaymentsFake;
let mail: MailFake;
let t: ReturnType<typeof startTestApp>;
let server: Server;
let url: string;
let jobs: Awaited<ReturnType<typeof startJobs>>;
let browser: Browser;

async function freePort(): Promise<number> {
  const probe = createServer();
  await new Promise<void>((r) => probe.listen(0, '127.0.0.1', r));
  const { port } = probe.address() as AddressInfo;
  await new Promise((r) => probe.close(r));
  return port;
}

beforeAll(async () => {
  payments = await startPaymentsFake({ port: 0, webhookSecret: SECRET, retryDelaysMs: [100, 200, 400] });
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  // The payment page sends the customer back to PUBLIC_URL, so the port is chosen before the app is built.
  const port = await freePort();
  url = `http://127.0.0.1:${port}`;
  t = startTestApp({
    PAYMENTS_PORT: String(payments.port), PAYMENTS_WEBHOOK_SECRET: SECRET, SMTP_PORT: String(mail.smtpPort),
    MAIL_INBOX_URL: mail.httpUrl, PUBLIC_URL: url, OUTBOX_POLL_SECONDS: '0.5', OUTBOX_RETRY_BASE_SECONDS: '1',
  });
  server = t.app.listen(port, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  payments.setWebhookUrl(`${url}/api/payments/webhook`);
  jobs = await startJobs(t.config, [outboxJob(t.knex, t.config)]);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await jobs?.stop();
  await new Promise((r) => server?.close(r));
  await payments?.close();
  await mail?.close();
  await t?.stop();
});

async function signIn(page: Page, email: string) {
  await page.goto(`${url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.endsWith('/sign-in'));
}

const shot = (page: Page, name: string) => page.screenshot({ path: path.join(SCREENSHOTS, `ordering-${name}.png`), fullPage: true });

async function openModelPage(page: Page) {
  const { models } = (await (await fetch(`${url}/api/models`)).json()) as { models: { id: number; name: string; options: { name: string }[] }[] };
  const model = models.find((m) => m.options.length >= 2);
  if (!model) throw new Error('the demo catalog has no model with two options');
  await page.goto(`${url}/shop`);
  await page.getByRole('link', { name: `Compare options for ${model.name}` }).click();
  await page.waitForURL(new RegExp(`/shop/${model.id}$`));
  await page.getByRole('group', { name: 'Choose a clipping option' }).waitFor();
  return model;
}

async function checkout(page: Page) {
  await page.getByRole('link', { name: /^Cart( \(\d+\))?$/ }).click(); // the one cart button, in the frame
  await page.getByRole('heading', { name: 'Your cart' }).waitFor();
  await page.getByText(/^Total$/).waitFor();
  await page.getByLabel('Full name').fill('Dee Castellano');
  await page.getByLabel('Street and number').fill('Rauchgasse 12');
  await page.getByLabel('Postcode').fill('04109');
  await page.getByLabel('Town or city').fill('Leipzig');
  await shot(page, 'cart');
  await page.getByRole('button', { name: /Place order and pay/ }).click();
  await page.waitForURL(/\/pay\/cs_/);
}

// The fake's hosted page: pick the outcome to play out, then pay.
async function payWithOutcome(page: Page, outcome: string) {
  await page.getByRole('radio', { name: new RegExp(outcome) }).check();
  await page.getByRole('button', { name: /^Pay/ }).click();
}

describe('ordering in a browser', () => {
  it('compares two options, pays on the payment page, lands on the paid order and the receipt is mailed', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, DEMO.customer);
    const model = await openModelPage(page);
    // Two options side by side, each with engine figures in their units.
    const cards = page.getByRole('radio');
    expect(await cards.count()).toBeGreaterThanOrEqual(2);
    // The figures come from the page's Web Worker: wait until they are drawn, then read them all.
    await page.locator('dd.num', { hasText: / dBc$/ }).first().waitFor();
    const thd = await page.locator('dd.num').allTextContents();
    expect(thd.some((x) => / %$/.test(x))).toBe(true);
    expect(thd.some((x) => / dBc$/.test(x))).toBe(true);
    await page.getByRole('img', { name: /Harmonic levels H2 to H7/ }).waitFor();
    await page.getByRole('img', { name: /THD in percent against drive/ }).waitFor();
    const first = model.options[0].name;
    const second = model.options[1].name;
    await page.getByRole('radio', { name: new RegExp(first) }).check();
    await page.getByRole('radio', { name: new RegExp(second) }).check();
    // The listening preview: play, switch A/B, and the page's level meter shows sound came out.
    const preview = page.getByRole('region', { name: 'Listen before you choose' });
    await preview.getByRole('button', { name: 'Play' }).click();
    await preview.getByRole('button', { name: 'Stop' }).waitFor();
    await page.waitForTimeout(700);
    await preview.getByRole('radio', { name: 'Hear B' }).click();
    await page.waitForTimeout(500);
    const peakSeen = Number(await preview.locator('#listen-level').getAttribute('data-peak-seen'));
    expect(peakSeen).toBeGreaterThan(0.005);
    await preview.getByRole('button', { name: 'Stop' }).click();
    await shot(page, 'model');
    await page.getByRole('button', { name: `Add ${model.name} with ${second} to cart` }).click();
    await page.getByText(`Added 1 × ${model.name} with ${second} to your cart`).waitFor();
    await checkout(page);
    await page.getByRole('group', { name: 'What should happen to this test payment?' }).waitFor();
    await shot(page, 'payment-page');
    await payWithOutcome(page, 'The payment goes through');
    await page.waitForURL(/\/orders\/\d+\?paid=/);
    await page.getByText('Payment received — thank you.').waitFor({ timeout: 15_000 });
    expect(await page.getByTestId('order-state').textContent()).toBe('Paid');
    const number = (await page.getByRole('heading', { level: 1 }).textContent())?.replace('Order ', '');
    await shot(page, 'paid');

    // The receipt goes out through the outbox worker to the mail fake.
    const until = Date.now() + 20_000;
    let receipt: { id: string; subject: string } | undefined;
    while (!receipt && Date.now() < until) {
      const list = (await (await fetch(`${mail.httpUrl}/messages?to=${DEMO.customer}`)).json()) as { id: string; subject: string }[];
      receipt = list.find((m) => m.subject === `Receipt for order ${number}`);
      if (!receipt) await new Promise((r) => setTimeout(r, 250));
    }
    expect(receipt).toBeDefined();
    const full = await (await fetch(`${mail.httpUrl}/messages/${receipt!.id}`)).json();
    expect(full.text).toContain(`${model.name} — ${second}`);
    await page.getByRole('link', { name: 'My orders' }).first().click();
    await page.waitForURL(/\/orders$/);
    await page.getByRole('heading', { name: `Order ${number}`, level: 2 }).waitFor();
    await page.getByRole('link', { name: `Details and receipt for ${number}` }).waitFor();
    await shot(page, 'my-orders');
    await page.close();

    // Staff read it on the Sent mail page.
    const owner = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(owner, DEMO.owner);
    await owner.goto(`${url}/inbox`);
    await owner.getByRole('heading', { name: 'Sent mail', level: 1 }).waitFor();
    await owner.getByRole('button', { name: `Receipt for order ${number}` }).click();
    await owner.getByRole('heading', { name: `Receipt for order ${number}` }).waitFor();
    await owner.getByRole('button', { name: 'Plain text' }).click();
    await owner.getByText(`${model.name} — ${second}`, { exact: false }).first().waitFor();
    await shot(owner, 'inbox');
    await owner.goto(`${url}/order-desk`);
    await owner.getByRole('link', { name: number! }).waitFor();
    await shot(owner, 'order-desk');
    await owner.close();
  });

  it('lets a visitor browse and fill a cart, and asks them to sign in to order', async () => {
    const page = await browser.newPage({ viewport: { width: 390, height: 844 } });
    await page.goto(`${url}/shop`);
    await page.getByRole('heading', { name: 'Pedals', level: 1 }).waitFor();
    await shot(page, 'visitor-shop');
    const model = await openModelPage(page);
    await page.getByRole('radio', { name: new RegExp(model.options[0].name) }).check();
    await shot(page, 'visitor-model');
    await page.getByRole('button', { name: /^Add .* to cart$/ }).click();
    await page.getByRole('link', { name: /^Cart( \(\d+\))?$/ }).click(); // the one cart button, in the frame
    await page.getByText(/to order\. Your cart stays here\./).waitFor();
    expect(await page.getByRole('button', { name: /Place order and pay/ }).count()).toBe(0);
    await page.getByText(/^Total$/).waitFor();
    await shot(page, 'visitor-cart');
    await page.close();
  });

  it('leaves the order awaiting payment with the shop\'s own message after a declined payment', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signIn(page, DEMO.customer);
    const model = await openModelPage(page);
    await page.getByRole('radio', { name: new RegExp(model.options[0].name) }).check();
    await page.getByRole('button', { name: /^Add .* to cart$/ }).click();
    await checkout(page);
    await payWithOutcome(page, 'The payment is turned down');
    await page.getByText(DECLINED.message).waitFor();
    await shot(page, 'payment-page-declined');
    await page.getByRole('link', { name: 'Cancel and go back' }).click();
    await page.waitForURL(/\/orders\/\d+\?payment=cancelled/);
    // The shop's own sentence for the provider's code, not the provider's message.
    await page.getByText(`Your payment did not go through: ${PAYMENT_FAILURE_SENTENCES.card_declined}`).waitFor({ timeout: 15_000 });
    expect(await page.getByTestId('order-state').textContent()).toBe('Awaiting payment');
    await page.getByRole('button', { name: 'Try paying again' }).waitFor();
    await shot(page, 'declined');
    await page.close();
  });
});
