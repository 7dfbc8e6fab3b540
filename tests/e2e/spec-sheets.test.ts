import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startJobs } from '../../server/jobs/boss';
import { specSheetJob } from '../../server/jobs/spec-sheets';
import { DEMO } from '../support/app';
import { SCREENSHOTS, signedInPage, useBrowserApp } from '../support/browser';
import { insertBatch, insertOrder, userId } from '../api/spec-sheets-setup';

// A tester passes a unit and downloads its sheet; a planner makes a batch's sheets with a progress
// bar that survives a reload; the customer downloads the sheet from the order page; anyone checks the serial.
const env = useBrowserApp();
let jobs: Awaited<ReturnType<typeof startJobs>>;
let batch: Awaited<ReturnType<typeof insertBatch>>;
let orderId: number;

beforeAll(async () => {
  const customer = await userId(env.t.knex, DEMO.customer);
  const option = await env.t.knex('clipping_options as c').join('models as m', 'm.id', 'c.model_id').where({ 'm.sku': 'HM-SMD', 'c.code': 'ASYM' }).first('c.id');
  const order = await insertOrder(env.t.knex, customer, option.id, 3);
  orderId = order.orderId;
  batch = await insertBatch(env.t.knex, [{ vf: [1.792, 0.603] }, { vf: [1.861, 0.571] }, { vf: [1.80, 0.59] }], order);
  jobs = await startJobs(env.t.config, [specSheetJob(env.t.knex, env.t.config, 0.5)]);
}, 60_000);
afterAll(async () => {
  await jobs?.stop();
});

const pageAs = (email: string, viewport = { width: 1180, height: 900 }) => signedInPage(env, email, { viewport, acceptDownloads: true });

async function downloadPdf(page: Page, name: RegExp | string) {
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name }).click()]);
  const file = await download.path();
  return readFileSync(file!);
}

describe('spec sheets in the browser', () => {
  it('a tester passes a unit at the bench and downloads its sheet', async () => {
    const unit = batch.units[0];
    const predicted = (await env.t.knex('units').where({ id: unit.id }).first('predicted')).predicted.thdPercent as number;
    const page = await pageAs(DEMO.tester, { width: 1024, height: 1366 }); // a bench tablet, portrait
    await page.goto(`${env.url}/bench/${unit.id}`);
    await page.getByLabel('Current draw (mA)').fill('7.4');
    await page.getByLabel('Measured THD at the reference setting (%)').fill((predicted * 1.02).toFixed(2));
    await page.getByLabel('Pass', { exact: true }).check();
    await page.getByRole('button', { name: 'Save test' }).click();
    await page.getByText(`${unit.serial}: passed`).waitFor();
    const link = page.getByRole('link', { name: `Download spec sheet for ${unit.serial}` });
    await link.waitFor();
    expect((await link.boundingBox())!.height).toBeGreaterThanOrEqual(44);
    const pdf = await downloadPdf(page, `Download spec sheet for ${unit.serial}`);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(await env.t.knex('spec_sheets').where({ unit_id: unit.id }).first()).toBeTruthy();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'spec-sheets-bench.png'), fullPage: true });
    await page.context().close();
  }, 60_000);

  it('a planner makes all of a batch’s sheets with a progress bar that survives a reload', async () => {
    const page = await pageAs(DEMO.planner);
    await page.goto(`${env.url}/planning/${batch.batchId}`);
    await page.getByRole('button', { name: 'Make all spec sheets' }).click();
    await page.getByText(`Making 3 spec sheets for batch`).waitFor();
    const bar = page.getByRole('progressbar', { name: 'Spec sheets made' });
    await bar.waitFor();
    expect(await bar.getAttribute('aria-valuemax')).toBe('3');
    await page.getByRole('region', { name: 'Spec sheets' }).screenshot({ path: path.join(SCREENSHOTS, 'spec-sheets-batch-progress.png') });
    await page.reload();
    const archive = page.getByRole('link', { name: 'Download the archive (.zip)' });
    await archive.waitFor({ timeout: 30_000 });
    await page.getByText('All 3 sheets are made.').waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), archive.click()]);
    const zip = readFileSync((await download.path())!);
    expect(zip.subarray(0, 2).toString('latin1')).toBe('PK');
    await page.reload();
    await archive.waitFor(); // still there after a reload: the job lives in the database
    await page.getByRole('region', { name: 'Spec sheets' }).screenshot({ path: path.join(SCREENSHOTS, 'spec-sheets-batch-done.png') });
    await page.context().close();
  }, 60_000);

  it('the customer downloads the passed pedal’s sheet from the order page', async () => {
    const page = await pageAs(DEMO.customer, { width: 390, height: 844 }); // a phone
    await page.goto(`${env.url}/orders/${orderId}`);
    const list = page.getByRole('list', { name: 'Pedals and their spec sheets' });
    await list.waitFor();
    expect(await list.getByRole('listitem').count()).toBe(3);
    await expect.poll(() => list.getByText('Spec sheet once it passes its bench test').count()).toBe(2);
    const pdf = await downloadPdf(page, `Spec sheet ${batch.units[0].serial} (PDF)`);
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    await page.screenshot({ path: path.join(SCREENSHOTS, 'spec-sheets-order.png'), fullPage: true });
    await page.context().close();
  }, 60_000);

  it('anyone can check a serial on the verification page', async () => {
    const page = await env.browser.newPage({ viewport: { width: 390, height: 844 } });
    // The link the unit's spec sheet prints: serial and the unit's check code.
    const { verify_code: code } = await env.t.knex('units').where({ id: batch.units[0].id }).first('verify_code');
    await page.goto(`${env.url}/verify/${batch.units[0].serial}?c=${code}`);
    await page.getByRole('heading', { name: 'This is a genuine Hollowmere Effects unit' }).waitFor();
    expect(await page.getByText('Passed its bench test').count()).toBe(1);
    expect(await page.content()).not.toContain('Castellano');
    // The page's own font loaded from the server (Source Sans 3, shipped in an npm package).
    expect(await page.evaluate(async () => { await document.fonts.ready; return document.fonts.check('600 16px "Source Sans 3"'); })).toBe(true);
    await page.screenshot({ path: path.join(SCREENSHOTS, 'spec-sheets-verify.png'), fullPage: true });
    const missing = await page.goto(`${env.url}/verify/HM-B9999-999X`);
    expect(missing!.status()).toBe(404);
    await page.getByRole('heading', { name: 'Serial not found' }).waitFor();
    await page.close();
  });
});
