import { beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import { mkdirSync } from 'node:fs';
import type { Page } from 'playwright-core';
import { getBatch } from '../../server/services/production/planning';
import { appendMovements } from '../../server/services/stock/ledger';
import { SOLDERING_CAUTION } from '../../shared/catalog/cautions';
import { createFormatter } from '../../shared/format';
import { DEMO, signedInAgent, type TestAgent } from '../support/app';
import { signedInPage, useBrowserApp } from '../support/browser';
import { makePaidOrder } from '../api/production-fixture';

// The floor-ready screens at a desktop (1280×800) and the bench tablet (1024×768): the batch page
// as a workflow and the assembler's and tester's tablet. Screenshots are kept in docs/screens/.
const SIZES = [
  { name: 'desktop', viewport: { width: 1280, height: 800 } },
  { name: 'tablet', viewport: { width: 1024, height: 768 } },
] as const;
const DOCS = path.resolve('docs/screens');

const env = useBrowserApp();
let planner: TestAgent;
let model: { id: number; active_revision_id: number; name: string };
let options: { id: number; name: string }[];

beforeAll(async () => {
  mkdirSync(DOCS, { recursive: true });
  planner = await signedInAgent(env.t.app, DEMO.planner);
  model = await env.t.knex('models').whereNotNull('active_revision_id').where({ published: true }).orderBy('sku').first();
  options = await env.t.knex('clipping_options').where({ model_id: model.id }).orderBy(['position', 'id']);
});

const pageAs = (email: string, home: string, viewport: { width: number; height: number }) => signedInPage(env, email, { viewport, home });
const post = (url: string, body: object = {}) => planner.post(url).set('X-CSRF-Token', planner.csrf).send(body);
const shot = (page: Page, name: string) => page.screenshot({ path: path.join(DOCS, `${name}.png`), fullPage: false });
/** The one message the page shows (they replace each other, never stack). */
const message = (page: Page) => page.locator('[aria-live="polite"] [role="status"]');

describe('the batch page as a workflow', () => {
  for (const size of SIZES) {
    it(`shortages first, draft editing, folding sections and a release that names whom it mails (${size.name})`, async () => {
      // A batch being planned: one customer order, and a stock build big enough to run short of parts.
      const first = await makePaidOrder(env.t.knex, model.id, options[0].id, 1);
      const second = await makePaidOrder(env.t.knex, model.id, options[0].id, 1);
      const { body } = await post('/api/batches', { revisionId: model.active_revision_id, orderLineIds: [first.lineId], stockBuilds: [{ optionId: options[0].id, quantity: 400 }] }).expect(201);
      const short = (await getBatch(env.t.knex, body.id)).requirements.filter((r) => r.shortage > 0);
      expect(short.length, '400 stock builds run the demo stock short').toBeGreaterThan(0);

      const page = await pageAs(DEMO.planner, '/board', size.viewport);
      await page.goto(`${env.url}/planning/${body.id}`);
      const status = page.getByRole('region', { name: 'Batch status' });
      await status.getByText('Being planned').waitFor();
      await status.getByText(new RegExp(`Next:\\s*${short.length} parts? (is|are) short`)).waitFor();
      // The status and the first section are on screen without scrolling, and the first section is the parts.
      const headings = await page.locator('main h2').allTextContents();
      expect(headings[0]).toContain('Parts against stock');
      expect((await page.getByRole('heading', { name: 'Parts against stock' }).boundingBox())!.y).toBeLessThan(size.viewport.height);
      // "Only short parts" starts ticked: the table lists exactly the short parts; unticked, every part.
      const onlyShort = page.getByRole('checkbox', { name: /Only short parts/ });
      expect(await onlyShort.isChecked()).toBe(true);
      const rows = page.getByRole('table', { name: 'Parts for this batch' }).locator('tbody tr');
      expect(await rows.count()).toBe(short.length);
      await page.getByRole('link', { name: 'Purchase list (CSV)' }).waitFor();
      await shot(page, `batch-draft-${size.name}`);
      await onlyShort.uncheck();
      expect(await rows.count()).toBe((await getBatch(env.t.knex, body.id)).requirements.length);
      await onlyShort.check();

      // Long sections fold: the parts section's title folds and unfolds it.
      const partsToggle = page.getByRole('button', { name: 'Parts against stock' });
      await partsToggle.click();
      expect(await partsToggle.getAttribute('aria-expanded')).toBe('false');
      expect(await rows.first().isVisible()).toBe(false);
      await partsToggle.click();
      expect(await rows.first().isVisible()).toBe(true);

      // Draft editing: add the second order, take the stock build out.
      await page.getByRole('checkbox', { name: new RegExp(second.number) }).check();
      await page.getByRole('button', { name: 'Add to batch' }).click();
      await message(page).getByText('Added 1 line (1 unit) to the batch').waitFor();
      await page.getByRole('button', { name: `Remove stock build of ${options[0].name}` }).click();
      await message(page).getByText(/Stock build of 400 × .* taken out/).waitFor();
      expect((await env.t.knex('batch_lines').where({ batch_id: body.id }).pluck('order_line_id')).sort()).toEqual([first.lineId, second.lineId].sort());

      // Release asks first and lists the customers it will mail.
      if (await page.getByLabel('Reason to release with shortages').count()) await page.getByLabel('Reason to release with shortages').fill('deliveries due Monday');
      await page.getByRole('button', { name: 'Release batch…' }).click();
      const mailed = page.getByRole('list', { name: 'Customers to be mailed' });
      await mailed.getByText(first.number).waitFor();
      await mailed.getByText(second.number).waitFor();
      expect(await mailed.getByRole('listitem').count()).toBe(2);
      await shot(page, `batch-release-confirm-${size.name}`);
      await page.getByRole('button', { name: 'Not yet' }).click();
      expect((await env.t.knex('batches').where({ id: body.id }).first()).state).toBe('draft');
      await page.getByRole('button', { name: 'Release batch…' }).click();
      await page.getByRole('button', { name: 'Release and mail 2 customers' }).click();
      await message(page).getByText('Released: 2 units created, 2 customers told their ship date').waitFor();
      await status.getByText('Released to the bench').waitFor();
      await status.getByText(/Next:\s*2 units still to kit/).waitFor();
      // Released: the lines cannot change any more.
      expect(await page.getByRole('button', { name: 'Add to batch' }).count()).toBe(0);
      expect(await page.getByRole('button', { name: /^Remove/ }).count()).toBe(0);
      await shot(page, `batch-released-${size.name}`);
      await page.context().close();
    }, 120_000);
  }
});

/** A released, kitted one-unit batch of the demo model, assigned to Juno for a day already past. */
async function lateUnitForJuno() {
  const order = await makePaidOrder(env.t.knex, model.id, options[0].id, 1);
  const { body } = await post('/api/batches', { revisionId: model.active_revision_id, orderLineIds: [order.lineId] }).expect(201);
  const short = (await getBatch(env.t.knex, body.id)).requirements.filter((r) => r.shortage > 0);
  if (short.length) await env.t.knex.transaction((trx) => appendMovements(trx, short.map((s) => ({ partId: s.partId, kind: 'receive' as const, quantity: s.shortage, reason: 'supplier delivery', reference: 'DN-FLOOR' }))));
  await post(`/api/batches/${body.id}/release`).expect(200);
  await post(`/api/batches/${body.id}/kit`).expect(200);
  const unit = await env.t.knex('units').where({ batch_id: body.id }).first();
  const juno = await env.t.knex('users').where({ email: DEMO.assembler }).first();
  await post(`/api/batches/${body.id}/assignments`, { builds: [{ unitId: unit.id, assemblerId: juno.id, date: '2026-01-05' }] }).expect(200);
  return unit as { id: number; serial: string };
}

describe('the bench tablet', () => {
  for (const size of SIZES) {
    it(`folded navigation, late flags, a scanned serial, one caution per kind, confirm fast finishes, reopen with a reason, one message at a time (${size.name})`, async () => {
      const unit = await lateUnitForJuno();
      const steps = await env.t.knex('build_steps').where({ revision_id: model.active_revision_id }).orderBy('position');
      const page = await pageAs(DEMO.assembler, '/builds', size.viewport);

      // Navigation: beside the page on the desktop, folded behind "Menu" on the tablet.
      const nav = page.getByRole('navigation', { name: 'Main' });
      const menu = page.getByRole('button', { name: 'Menu' });
      if (size.name === 'tablet') {
        expect(await nav.isVisible()).toBe(false);
        expect((await page.locator('main').boundingBox())!.x).toBe(0);
        await menu.click();
        expect(await nav.getByRole('link', { name: 'My builds' }).isVisible()).toBe(true);
        await shot(page, `bench-menu-${size.name}`);
        await menu.click();
        expect(await nav.isVisible()).toBe(false);
      } else {
        await nav.getByRole('link', { name: 'My builds' }).waitFor();
        expect(await menu.isVisible()).toBe(false);
      }

      // Late builds are flagged in words.
      const row = page.getByRole('row').filter({ hasText: unit.serial });
      await row.getByText('Late', { exact: true }).waitFor();
      // The planned day, written by the shop's one formatter.
      await row.getByText(createFormatter().date('2026-01-05')).waitFor();
      await shot(page, `my-builds-${size.name}`);

      // A scanner types the label and ends with Enter: with no field focused, the unit opens.
      await page.locator('body').click({ position: { x: 5, y: size.viewport.height - 5 } });
      await page.keyboard.type(unit.serial, { delay: 5 });
      await page.keyboard.press('Enter');
      await page.waitForURL(`**/builds/${unit.id}`);
      await page.getByRole('heading', { name: 'Checklist' }).waitFor();
      await page.getByText('Late: planned for 2026-01-05.').waitFor();

      // Each caution once per kind: the soldering text once, each soldering step names it.
      expect(await page.getByText(SOLDERING_CAUTION).count()).toBe(1);
      const soldering = steps.filter((s) => s.soldering).length;
      expect(await page.getByRole('listitem').filter({ hasText: /Caution:\s*Soldering/ }).count()).toBe(soldering);

      // Finishing a step seconds after starting it asks first; "Not yet" leaves it running.
      const [s1] = steps;
      await page.getByRole('button', { name: 'Start step 1', exact: true }).click();
      await message(page).getByText(`Started “${s1.title}”`).waitFor();
      await page.getByRole('button', { name: 'Finish step 1', exact: true }).click();
      const ask = page.getByRole('dialog', { name: 'Finished already?' });
      await ask.getByText(new RegExp(`under 25 % of its standard ${s1.standard_minutes} min`)).waitFor();
      await shot(page, `bench-fast-step-${size.name}`);
      await ask.getByRole('button', { name: 'Not yet: keep working' }).click();
      expect((await env.t.knex('unit_steps').where({ unit_id: unit.id, step_id: s1.id }).first()).finished_at).toBeNull();
      await page.getByRole('button', { name: 'Finish step 1', exact: true }).click();
      await ask.getByRole('button', { name: 'Yes, step 1 is finished' }).click();
      await message(page).getByText(new RegExp(`Finished “${s1.title}”`)).waitFor();

      // A finished step reopens with a reason, which goes into the history.
      await page.getByRole('button', { name: 'Reopen step 1' }).click();
      const reopen = page.getByRole('dialog', { name: 'Reopen step 1?' });
      await reopen.getByRole('button', { name: 'Reopen step' }).click();
      await reopen.getByText('Say why (at least 3 characters)').waitFor();
      await reopen.getByLabel('Why reopen it?').fill('tapped Finish by mistake');
      await shot(page, `bench-reopen-${size.name}`);
      await reopen.getByRole('button', { name: 'Reopen step' }).click();
      await message(page).getByText('Step 1 is open again; its time starts now').waitFor();
      await page.getByText(`reopened “${s1.title}”: tapped Finish by mistake`).waitFor();
      await page.getByRole('button', { name: 'Finish step 1', exact: true }).waitFor();

      // Quick taps: each message replaces the last, so there is only ever one.
      await page.getByRole('button', { name: 'Start step 2', exact: true }).click();
      await page.getByRole('button', { name: 'Start step 3', exact: true }).click();
      await message(page).getByText(`Started “${steps[2].title}”`).waitFor();
      expect(await message(page).count()).toBe(1);
      // The message sits at the bottom, clear of the title.
      expect((await message(page).boundingBox())!.y).toBeGreaterThan((await page.getByRole('heading', { level: 1 }).boundingBox())!.y + 100);
      await shot(page, `bench-checklist-${size.name}`);
      await page.context().close();

      // The tester's bench takes a serial typed into its box.
      const tester = await pageAs(DEMO.tester, '/bench', size.viewport);
      await tester.getByLabel('Open a unit by serial').fill(unit.serial.toLowerCase());
      await tester.getByLabel('Open a unit by serial').press('Enter');
      await tester.waitForURL(`**/bench/${unit.id}`);
      await tester.getByRole('heading', { name: `Test ${unit.serial}` }).waitFor();
      await tester.goBack();
      await tester.getByLabel('Open a unit by serial').fill('ZZ-NOPE-1');
      await tester.getByLabel('Open a unit by serial').press('Enter');
      await tester.getByText('No unit has the serial ZZ-NOPE-1').waitFor();
      await shot(tester, `test-bench-serial-${size.name}`);
      await tester.context().close();
    }, 120_000);
  }
});
