import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import wavefile from 'wavefile';
import type { Browser, Page } from 'playwright-core';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { createMailer, sendDueMail } from '../../server/services/mail/sender';
import { getBatch } from '../../server/services/production/planning';
import { appendMovements } from '../../server/services/stock/ledger';
import { SOLDERING_CAUTION } from '../../shared/catalog/cautions';
import { DEMO, DEMO_PASSWORD, startTestApp } from '../support/app';
import { launchBrowser, listen, SCREENSHOTS } from '../support/browser';

// The production path on the demo data, in a browser: the planner releases a batch for the demo
// customer's paid order and applies a proposed plan; Juno builds it with measured Vf; the tester
// uploads a WAV capture and passes it; the planner ships; the customer sees it shipped and has the mail.
let mail: MailFake;
let t: ReturnType<typeof startTestApp>;
let browser: Browser;
let server: Awaited<ReturnType<typeof listen>>;

beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
  t = startTestApp({ SMTP_PORT: String(mail.smtpPort), MAIL_INBOX_URL: mail.httpUrl });
  server = await listen(t.app);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  await t?.stop();
  await mail?.close();
});

async function signIn(email: string, home: string) {
  const page = await browser.newPage({ viewport: { width: 1180, height: 900 } });
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(`**${home}`);
  return page;
}

const shortParts = async (batchId: number) => (await getBatch(t.knex, batchId)).requirements.filter((r) => r.shortage > 0);
const toast = (page: Page, text: RegExp) => page.getByText(text).first().waitFor({ timeout: 20_000 });
const shot = (page: Page, name: string) => page.screenshot({ path: path.join(SCREENSHOTS, `production-${name}.png`), fullPage: true });

function captureWithThd(thdPercent: number) {
  const rate = 48000;
  const n = rate; // one second; 1000 Hz is coherent here, so use 997 Hz to make the capture non-coherent
  const s = Array.from({ length: n }, (_, i) => Math.round(16000 * (Math.sin((2 * Math.PI * 997 * i) / rate) + (thdPercent / 100) * Math.sin((4 * Math.PI * 997 * i) / rate))));
  const wav = new wavefile.WaveFile();
  wav.fromScratch(1, rate, '16', s);
  const file = path.join(mkdtempSync(path.join(tmpdir(), 'kp-wav-')), 'capture.wav');
  writeFileSync(file, Buffer.from(wav.toBuffer()));
  return file;
}

describe('production in the browser', () => {
  it('plans, builds, tests and ships the demo customer’s order', async () => {
    const line = await t.knex('order_lines as l').join('orders as o', 'o.id', 'l.order_id').join('users as u', 'u.id', 'o.customer_id')
      .join('models as m', 'm.id', 'l.model_id').where({ 'u.email': DEMO.customer, 'o.state': 'paid' }).whereNull('l.batch_id')
      .first('l.id', 'o.id as order_id', 'o.number', 'm.name as model_name', 'm.active_revision_id');
    expect(line, 'the demo seeds give the customer a paid order').toBeTruthy();

    // Planner: plan and release a batch with that order line.
    const planner = await signIn(DEMO.planner, '/board');
    await shot(planner, 'board-before');
    await planner.getByRole('link', { name: 'Batches' }).click();
    const revision = await t.knex('model_revisions').where({ id: line.active_revision_id }).first();
    await planner.getByLabel('Model revision').selectOption(String(revision.id));
    await planner.getByRole('checkbox', { name: new RegExp(line.number) }).check();
    await shot(planner, 'new-batch');
    await planner.getByRole('button', { name: 'Plan batch' }).click();
    await planner.waitForURL(/\/planning\/\d+$/);
    await planner.getByRole('heading', { name: 'Parts against stock' }).waitFor();
    if (await planner.getByLabel('Reason to release with shortages').count()) {
      await planner.getByLabel('Reason to release with shortages').fill('demo stock is thin; deliveries due this week');
    }
    await shot(planner, 'batch-plan');
    await planner.getByRole('button', { name: 'Release batch…' }).click();
    // Release asks first and names the customer it will mail.
    await planner.getByRole('list', { name: 'Customers to be mailed' }).getByText(line.number).waitFor();
    await planner.getByRole('button', { name: 'Release and mail 1 customer' }).click();
    await toast(planner, /Released: 1 unit created, 1 customer/);
    // A supplier delivery covers whatever the demo stock is short of, before kitting.
    const detail = await t.knex('units').where({ order_id: line.order_id }).first('batch_id');
    const short = await shortParts(detail.batch_id);
    if (short.length) await t.knex.transaction((trx) => appendMovements(trx, short.map((s) => ({ partId: s.partId, kind: 'receive' as const, quantity: s.shortage, reason: 'supplier delivery', reference: 'DN-E2E' }))));
    await planner.getByRole('button', { name: 'Kit units' }).click();
    await toast(planner, /Kitted 1 unit\b/);
    const unit = await t.knex('units').where({ order_id: line.order_id }).first();
    await planner.getByRole('button', { name: 'Propose a balanced plan' }).click();
    await toast(planner, /Proposed a plan for 1 unit/);
    await planner.getByText(/Adjust single builds/).click();
    await planner.getByLabel(`Builder of ${unit.serial}`).selectOption({ label: 'Juno Abara' });
    await shot(planner, 'proposed-plan');
    await planner.getByRole('button', { name: 'Apply plan' }).click();
    await toast(planner, /Plan applied: 1 build assigned/);
    expect((await t.knex('units').where({ id: unit.id }).first()).assembler_id).toBe((await t.knex('users').where({ email: DEMO.assembler }).first()).id);
    const scheduledMail = await t.knex('outbox').where({ template: 'order-scheduled', to_address: DEMO.customer }).orderBy('id', 'desc').first();
    expect(scheduledMail.data.estimatedShipDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);

    // Assembler at tablet width: work the checklist, record Vf, lots, mark built.
    const juno = await signIn(DEMO.assembler, '/builds');
    await juno.setViewportSize({ width: 1024, height: 1300 });
    await juno.getByRole('link', { name: unit.serial }).waitFor();
    await shot(juno, 'my-builds');
    await juno.getByRole('link', { name: unit.serial }).click();
    await juno.getByRole('heading', { name: 'Checklist' }).waitFor();
    // The soldering caution is shown in full once for the build; each soldering step names it.
    const solderingSteps = await t.knex('build_steps').where({ revision_id: revision.id, soldering: true }).count<{ count: number }[]>('* as count');
    expect(await juno.getByText(SOLDERING_CAUTION).count()).toBe(1);
    expect(await juno.getByRole('listitem').filter({ hasText: /Caution:\s*Soldering/ }).count()).toBe(Number(solderingSteps[0].count));
    const steps = await t.knex('build_steps').where({ revision_id: revision.id }).orderBy('position');
    for (const s of steps) {
      await juno.getByRole('button', { name: `Start step ${s.position}`, exact: true }).click();
      await juno.getByRole('button', { name: `Finish step ${s.position}`, exact: true }).click();
      // Finished within seconds, far under the standard time: the tablet asks first.
      await juno.getByRole('button', { name: `Yes, step ${s.position} is finished` }).click();
      await toast(juno, new RegExp(`Finished “${s.title.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}”`));
    }
    const vfInputs = juno.locator('input[id^="vf-"]');
    for (let i = 0; i < (await vfInputs.count()); i++) {
      const input = vfInputs.nth(i);
      const hint = await juno.locator(`#${await input.getAttribute('id')}-hint`).textContent();
      const nominal = Number(/Nominal ([\d.]+) V/.exec(hint ?? '')?.[1]);
      await input.fill((nominal + 0.004).toFixed(3));
    }
    await juno.getByRole('button', { name: 'Save readings' }).click();
    await toast(juno, /predicted THD is now [\d.]+ %/);
    const lotInputs = juno.locator('input[id^="lot-"]');
    if (await lotInputs.count()) {
      for (let i = 0; i < (await lotInputs.count()); i++) await lotInputs.nth(i).fill(`L26-12-${i + 1}`);
      await juno.getByRole('button', { name: 'Save lots' }).click();
      await toast(juno, /Part lots saved/);
    }
    await shot(juno, 'build-tablet');
    await juno.getByRole('button', { name: 'Mark build finished' }).click();
    await toast(juno, /is built and goes to the test bench/);
    const built = await t.knex('units').where({ id: unit.id }).first();
    expect(built.state).toBe('built');
    expect(built.predicted.fromMeasuredVf).toBe(true);

    // Tester: upload a capture whose THD matches the prediction, and pass it.
    const tester = await signIn(DEMO.tester, '/bench');
    await tester.getByRole('heading', { name: 'Test bench' }).waitFor();
    expect(await tester.getByText(/test gear runs on mains power/).count()).toBe(1);
    await tester.getByRole('link', { name: unit.serial }).click();
    const predicted = built.predicted.thdPercent as number;
    await tester.getByLabel('Current draw (mA)').fill('7.8');
    await tester.getByLabel('Measured THD at the reference setting (%)').fill(predicted.toFixed(2));
    await tester.locator('#capture-file').setInputFiles(captureWithThd(predicted));
    await tester.getByRole('button', { name: 'Save test' }).click();
    await toast(tester, new RegExp(`${unit.serial}: passed; capture THD`));
    await tester.getByText(/fundamental 997\.\d Hz/).waitFor();
    await shot(tester, 'bench-result');
    expect((await t.knex('orders').where({ id: line.order_id }).first()).state).toBe('ready');

    // Planner ships the order.
    await planner.goto(`${server.url}/shipping`);
    await planner.getByLabel(`Carrier for ${line.number}`).fill('Parcelwise');
    await planner.getByLabel('Tracking number').first().fill('PW-2026-88431');
    await planner.getByRole('button', { name: 'Ship order' }).first().click();
    await toast(planner, new RegExp(`Order ${line.number} shipped`));
    await planner.getByRole('link', { name: 'Packing slip (PDF)' }).first().waitFor();
    await shot(planner, 'shipping');
    await planner.goto(`${server.url}/board`);
    await planner.getByRole('heading', { name: 'Batches in progress' }).waitFor();
    await shot(planner, 'board-after');

    // The customer sees it shipped, and the mail arrives over SMTP through the outbox.
    const customer = await signIn(DEMO.customer, '/shop');
    await customer.goto(`${server.url}/orders`);
    await customer.getByText(line.number).first().waitFor();
    // On the order's card (heading and progress list together), the current step is now "Shipped".
    const card = customer.locator('div, article, li, section')
      .filter({ has: customer.getByRole('heading', { name: `Order ${line.number}` }) })
      .filter({ has: customer.getByRole('list', { name: 'Order progress' }) }).last();
    expect(await card.locator('[aria-current="step"]').textContent()).toBe('Shipped');
    await shot(customer, 'customer-orders');
    // Earlier test files leave mail queued in the shared outbox: send everything due (bounded), not one round.
    await sendDueMail(t.knex, createMailer(t.config), t.config, 500);
    const inbox = (await (await fetch(`${mail.httpUrl}/messages?to=${encodeURIComponent(DEMO.customer)}`)).json()) as { subject: string }[];
    expect(inbox.map((m) => m.subject)).toContain(`Order ${line.number} is on its way`);
  }, 240_000);
});
