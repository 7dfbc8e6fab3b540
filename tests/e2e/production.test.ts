import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import wavefile from 'wavefile';
import type { Page } from 'playwright-core';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { createMailer, sendDueMail } from '../../server/services/mail/sender';
import { getBatch } from '../../server/services/production/planning';
import { appendMovements } from '../../server/services/stock/ledger';
import { SOLDERING_CAUTION } from '../../shared/catalog/cautions';
import { PLAN_EXPLAINED } from '../../shared/production/schedule';
import { DEMO } from '../support/app';
import { SCREENSHOTS, signedInPage, useBrowserApp } from '../support/browser';

// The production path on the demo data, in a browser: the planner releases a batch for the demo
// customer's paid order and applies a proposed plan; Juno builds it with measured Vf; the tester
// chooses a WAV capture, reads it against the prediction and passes it; the planner ships; the customer sees it shipped and has the mail.

// The mail fake starts first (the app sends to it) and, its afterAll registered first, closes last.
let mail: MailFake;
beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
});
afterAll(async () => {
  await mail?.close();
});
const env = useBrowserApp({ env: () => ({ SMTP_PORT: String(mail.smtpPort), MAIL_INBOX_URL: mail.httpUrl }) });

const pageAs = (email: string, home: string) => signedInPage(env, email, { viewport: { width: 1180, height: 900 }, home });

const shortParts = async (batchId: number) => (await getBatch(env.t.knex, batchId)).requirements.filter((r) => r.shortage > 0);
const toast = (page: Page, text: RegExp) => page.getByText(text).first().waitFor({ timeout: 20_000 });
const shot = (page: Page, name: string) => page.screenshot({ path: path.join(SCREENSHOTS, `production-${name}.png`), fullPage: true });

/**
 * A capture of this unit's predicted spectrum (harmonics above −100 dBc, H1 at half scale) at 997 Hz,
 * which does not fit a whole number of periods into the second: non-coherent, like a real capture.
 */
function captureOfPrediction(predicted: { order: number; dbc: number }[]) {
  const rate = 48000;
  const levels = predicted.filter((h) => h.order === 1 || h.dbc > -100).map((h) => ({ order: h.order, amplitude: 0.5 * (h.order === 1 ? 1 : 10 ** (h.dbc / 20)) }));
  const s = Array.from({ length: rate }, (_, i) => Math.round(32767 * levels.reduce((x, h) => x + h.amplitude * Math.sin((2 * Math.PI * h.order * 997 * i) / rate + 0.3 * h.order), 0)));
  const wav = new wavefile.WaveFile();
  wav.fromScratch(1, rate, '16', s);
  const file = path.join(mkdtempSync(path.join(tmpdir(), 'kp-wav-')), 'capture.wav');
  writeFileSync(file, Buffer.from(wav.toBuffer()));
  return file;
}

describe('production in the browser', () => {
  it('plans, builds, tests and ships the demo customer’s order', async () => {
    const line = await env.t.knex('order_lines as l').join('orders as o', 'o.id', 'l.order_id').join('users as u', 'u.id', 'o.customer_id')
      .join('models as m', 'm.id', 'l.model_id').where({ 'u.email': DEMO.customer, 'o.state': 'paid' }).whereNull('l.batch_id')
      .first('l.id', 'o.id as order_id', 'o.number', 'm.name as model_name', 'm.active_revision_id');
    expect(line, 'the demo seeds give the customer a paid order').toBeTruthy();

    // Planner: plan and release a batch with that order line.
    const planner = await pageAs(DEMO.planner, '/board');
    await shot(planner, 'board-before');
    await planner.getByRole('link', { name: 'Batches' }).click();
    const revision = await env.t.knex('model_revisions').where({ id: line.active_revision_id }).first();
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
    const detail = await env.t.knex('units').where({ order_id: line.order_id }).first('batch_id');
    const short = await shortParts(detail.batch_id);
    if (short.length) await env.t.knex.transaction((trx) => appendMovements(trx, short.map((s) => ({ partId: s.partId, kind: 'receive' as const, quantity: s.shortage, reason: 'supplier delivery', reference: 'DN-E2E' }))));
    await planner.getByRole('button', { name: 'Kit units' }).click();
    await toast(planner, /Kitted 1 unit\b/);
    const unit = await env.t.knex('units').where({ order_id: line.order_id }).first();
    await planner.getByRole('button', { name: 'Propose a balanced plan' }).click();
    await toast(planner, /Proposed a plan for 1 unit/);
    // The plan is explained in the shop's words, with no textbook name for the method.
    await planner.getByText(PLAN_EXPLAINED).waitFor();
    expect(await planner.getByText(/scheduling|LPT|processing.time/i).count()).toBe(0);
    await planner.getByText(/Adjust single builds/).click();
    await planner.getByLabel(`Builder of ${unit.serial}`).selectOption({ label: 'Juno Abara' });
    await shot(planner, 'proposed-plan');
    await planner.getByRole('button', { name: 'Apply plan' }).click();
    await toast(planner, /Plan applied: 1 build assigned/);
    expect((await env.t.knex('units').where({ id: unit.id }).first()).assembler_id).toBe((await env.t.knex('users').where({ email: DEMO.assembler }).first()).id);
    const scheduledMail = await env.t.knex('outbox').where({ template: 'order-scheduled', to_address: DEMO.customer }).orderBy('id', 'desc').first();
    expect(scheduledMail.data.estimatedShipDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);

    // Assembler at tablet width: work the checklist, record Vf, lots, mark built.
    const juno = await pageAs(DEMO.assembler, '/builds');
    await juno.setViewportSize({ width: 1024, height: 1300 });
    await juno.getByRole('link', { name: unit.serial }).waitFor();
    await shot(juno, 'my-builds');
    await juno.getByRole('link', { name: unit.serial }).click();
    await juno.getByRole('heading', { name: 'Checklist' }).waitFor();
    // The soldering caution is shown in full once for the build; each soldering step names it.
    const solderingSteps = await env.t.knex('build_steps').where({ revision_id: revision.id, soldering: true }).count<{ count: number }[]>('* as count');
    expect(await juno.getByText(SOLDERING_CAUTION).count()).toBe(1);
    expect(await juno.getByRole('listitem').filter({ hasText: /Caution:\s*Soldering/ }).count()).toBe(Number(solderingSteps[0].count));
    const steps = await env.t.knex('build_steps').where({ revision_id: revision.id }).orderBy('position');
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
    const built = await env.t.knex('units').where({ id: unit.id }).first();
    expect(built.state).toBe('built');
    expect(built.predicted.fromMeasuredVf).toBe(true);

    // Tester: choosing a capture analyses it at once; the comparison and the verdict come before saving.
    const tester = await pageAs(DEMO.tester, '/bench');
    await tester.getByRole('heading', { name: 'Test bench' }).waitFor();
    expect(await tester.getByText(/test gear runs on mains power/).count()).toBe(1);
    await tester.getByRole('link', { name: unit.serial }).click();
    // Without a capture, an empty THD box is a field error, not 0 %.
    await tester.getByLabel('Current draw (mA)').fill('7.8');
    await tester.getByRole('button', { name: 'Save test' }).click();
    await tester.getByText('Enter the measured THD (%), or choose a WAV capture to read it from').waitFor();
    await tester.getByLabel('WAV capture of the 1 kHz test tone at the reference setting').setInputFiles(captureOfPrediction(built.predicted.harmonics));
    await tester.getByText(/Measured THD\s*F\s*from the capture: [\d.]+ %/).waitFor({ timeout: 20_000 });
    expect(await tester.getByLabel(/Measured THD at the reference setting/).count()).toBe(0);
    const table = tester.getByRole('table', { name: /Predicted and measured at \d+ % drive/ });
    await expect.poll(() => table.getByRole('row').count()).toBe(10); // header, H2…H8, THD_F, THD_R
    expect(await table.getByRole('columnheader', { name: 'Measured' }).count()).toBe(1);
    await tester.getByRole('img', { name: /Capture overlaid on the predicted spectrum/ }).waitFor();
    await tester.getByText('Within tolerance: the measurement agrees with this unit’s prediction.').waitFor();
    await shot(tester, 'bench-capture');
    await tester.screenshot({ path: path.resolve('docs/bench-capture-test.png'), fullPage: true });
    await tester.getByRole('button', { name: 'Save test' }).click();
    await toast(tester, new RegExp(`${unit.serial}: passed with THD [\\d.]+ % from the capture`));
    // The unit's test record keeps the measured column beside the predicted one.
    const saved = tester.getByRole('table', { name: 'Predicted and measured at the reference setting' });
    await saved.waitFor();
    expect(await saved.getByRole('columnheader', { name: 'Measured' }).count()).toBe(1);
    const record = await env.t.knex('test_records').where({ unit_id: unit.id }).first();
    expect(record.measured_harmonics).toHaveLength(10);
    await tester.getByText(/fundamental 997\.\d Hz/).first().waitFor();
    await shot(tester, 'bench-result');
    expect((await env.t.knex('orders').where({ id: line.order_id }).first()).state).toBe('ready');

    // Planner ships the order.
    await planner.goto(`${env.url}/shipping`);
    // The carriers come from the settings (the demo's first one); shipping asks before it ships.
    const carrier = await env.t.knex('carriers').where({ active: true }).orderBy('position').first();
    await planner.getByRole('link', { name: `Packing slip for ${line.number} (PDF)` }).waitFor();
    await planner.getByLabel(`Carrier for ${line.number}`).selectOption({ label: carrier.name });
    await planner.getByLabel('Tracking number').first().fill('PW-2026-88431');
    await planner.getByRole('button', { name: 'Ship order' }).first().click();
    const question = planner.getByRole('dialog');
    await expect(question.textContent()).resolves.toContain(`Ship order ${line.number} with ${carrier.name}`);
    await shot(planner, 'ship-confirm');
    await question.getByRole('button', { name: 'Yes, ship it' }).click();
    await toast(planner, new RegExp(`Order ${line.number} shipped with ${carrier.name}`));
    await planner.getByRole('link', { name: 'Packing slip (PDF)' }).first().waitFor();
    await shot(planner, 'shipping');
    await planner.goto(`${env.url}/board`);
    await planner.getByRole('heading', { name: 'Batches in progress' }).waitFor();
    await shot(planner, 'board-after');

    // The customer sees it shipped, and the mail arrives over SMTP through the outbox.
    const customer = await pageAs(DEMO.customer, '/shop');
    await customer.goto(`${env.url}/orders`);
    // Newest first: other tests' orders for the demo customer may push this one to a later page.
    await customer.getByRole('heading', { name: /^Order / }).first().waitFor();
    for (let page = 1; page < 20 && !(await customer.getByRole('heading', { name: `Order ${line.number}` }).count()); page++) {
      const before = await customer.getByRole('heading', { name: /^Order / }).first().textContent();
      await customer.getByRole('button', { name: 'Next page' }).click();
      await expect.poll(() => customer.getByRole('heading', { name: /^Order / }).first().textContent()).not.toBe(before);
    }
    await customer.getByText(line.number).first().waitFor();
    // On the order's card (heading and progress list together), the current step is now "Shipped".
    const card = customer.locator('div, article, li, section')
      .filter({ has: customer.getByRole('heading', { name: `Order ${line.number}` }) })
      .filter({ has: customer.getByRole('list', { name: 'Order progress' }) }).last();
    expect(await card.locator('[aria-current="step"]').textContent()).toBe('Shipped');
    await shot(customer, 'customer-orders');
    // The order page links to the carrier's tracking page.
    await customer.goto(`${env.url}/orders/${line.order_id}`);
    const track = customer.getByRole('link', { name: `Track the parcel with ${carrier.name}` });
    expect(await track.getAttribute('href')).toBe(carrier.tracking_url_template.replace('{tracking}', 'PW-2026-88431'));
    // Earlier test files leave mail queued in the shared outbox: send everything due (bounded), not one round.
    await sendDueMail(env.t.knex, createMailer(env.t.config), env.t.config, 500);
    const inbox = (await (await fetch(`${mail.httpUrl}/messages?to=${encodeURIComponent(DEMO.customer)}`)).json()) as { subject: string }[];
    expect(inbox.map((m) => m.subject)).toContain(`Order ${line.number} is on its way`);
  }, 240_000);
});
