import { describe, expect, it } from 'vitest';
import express from 'express';
import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { DEMO, DEMO_PASSWORD } from '../support/app';
import { SCREENSHOTS, signIn, useBrowserApp } from '../support/browser';

const run = promisify(execFile);
const env = useBrowserApp({ wrap: withClient });
const stamp = `${process.pid}${Date.now() % 100000}`;
const work = mkdtempSync(path.join(tmpdir(), 'kp-catalog-'));

// KP_CATALOG_DIST lets this test serve a client built elsewhere (a shared dist/ may be mid-rebuild).
function withClient(app: express.Express) {
  const dist = process.env.KP_CATALOG_DIST;
  if (!dist) return app;
  const outer = express();
  outer.use(express.static(dist, { index: false }));
  outer.get(/^\/(?!api\/).*/, (_req, res) => res.sendFile(path.join(dist, 'index.html')));
  outer.use(app);
  return outer;
}

describe('the catalog in a browser', () => {
  it('a planner imports a BOM from CSV after fixing a bad row, adds a clipping option and sees its profile', async () => {
    const page = await env.browser.newPage({ viewport: { width: 1366, height: 1000 } });
    await signIn(page, env.url, DEMO.planner);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Pedal models' }).click();
    await page.getByRole('table', { name: 'Pedal models' }).getByRole('link', { name: 'Saltmarsh Drive' }).waitFor();

    const name = `Brindle Push ${stamp}`;
    await page.getByLabel('Name').fill(name);
    await page.getByLabel('SKU').fill(`HM-BP${stamp}`);
    await page.getByLabel('Base price in cents').fill('17900');
    await page.getByRole('button', { name: 'Create model' }).click();
    await page.getByRole('heading', { name, level: 1 }).waitFor();
    await page.getByRole('link', { name: /Revision 1/ }).click();
    await page.getByRole('heading', { name: `${name} — revision 1` }).waitFor();

    // One bad row: a part number the catalog does not know.
    await page.getByLabel('Choose CSV file').setInputFiles(path.resolve('tests/fixtures/bom-one-bad-row.csv'));
    const preview = page.getByRole('table', { name: 'CSV preview' });
    await preview.getByText('Unknown part number "R-NOPE-99"').waitFor();
    await expect(page.getByText('bom-one-bad-row.csv: 1 of 4 rows need fixing').isVisible()).resolves.toBe(true);
    expect(await page.getByRole('button', { name: 'Import 4 rows' }).isDisabled()).toBe(true);
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-bom-csv-error.png'), fullPage: true });

    const fixed = path.join(work, 'bom-fixed.csv');
    writeFileSync(fixed, 'Part Number,QTY,Designators,Notes\nR-10K-MF,2,R1 R2,bias\nC-100N-FILM,1,C1,input coupling\nR-1K-MF,1,R3,\nIC-TL072,1,IC1,\n');
    await page.getByLabel('Choose CSV file').setInputFiles(fixed);
    await page.getByText('bom-fixed.csv: all 4 rows are good').waitFor();
    await page.getByRole('button', { name: 'Import 4 rows' }).click();
    await page.getByText(/Imported 4 BOM lines from bom-fixed\.csv/).first().waitFor();
    const bom = page.getByRole('table', { name: 'BOM of revision 1' });
    await bom.getByRole('link', { name: 'R-1K-MF' }).waitFor();
    expect(await bom.getByRole('row').count()).toBe(5);

    await page.getByRole('link', { name: `Back to ${name}` }).click();
    const [si, red] = await Promise.all(['si-small-signal', 'led-red'].map((k) => env.t.knex('devices').where({ preset_key: k }).first('id')));
    const form = page.getByRole('heading', { name: 'Add a clipping option' }).locator('..');
    await form.getByLabel('Name', { exact: true }).fill('Silicon against red LED');
    await form.getByLabel('Code').fill('SIRED');
    await form.getByLabel('Series resistor (Ω)').fill('2200');
    await form.getByLabel('Positive string, device 1').selectOption(String(si.id));
    await form.getByLabel('Negative string, device 1').selectOption(String(red.id));
    await form.getByLabel('Surcharge in cents').fill('900');
    await form.getByRole('button', { name: 'Add option' }).click();
    await page.getByRole('heading', { name: `${name} — Silicon against red LED` }).waitFor();

    const table = page.getByRole('table', { name: 'Engine output at the reference setting' });
    await table.waitFor({ timeout: 30_000 });
    await page.getByRole('img', { name: 'Harmonics at three drive settings' }).waitFor();
    await page.getByRole('img', { name: 'THD_F against drive' }).waitFor();
    await page.getByRole('img', { name: /Transfer curve at 50 % drive/ }).waitFor();
    const vf = page.getByRole('table', { name: 'Forward voltages of the option’s devices' });
    expect(await vf.getByRole('row').count()).toBe(3);

    // The drive slider redraws: the readout and the transfer curve follow it.
    const readout = page.locator('output[for="drive-slider"]');
    await readout.filter({ hasText: 'gain ×10.9' }).waitFor();
    await page.getByLabel('Drive control').fill('90');
    await readout.filter({ hasText: '90 % ·' }).filter({ hasNotText: '…' }).waitFor();
    await page.getByRole('img', { name: /Transfer curve at 90 % drive/ }).waitFor();
    await page.getByLabel('Drive control').fill('50');
    await page.getByRole('img', { name: /Transfer curve at 50 % drive/ }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-option-profile.png'), fullPage: true });

    // Outside check: the numbers on the page equal the engine CLI's output (npm run --silent profile, the
    // engine's documented contract) for the engine input shared/catalog/circuit.ts makes for this option.
    const shown: Record<string, string> = {};
    for (const row of await table.getByRole('row').all()) {
      const cells = await row.locator('th,td').allTextContents();
      if (cells.length >= 2 && cells[0] !== 'Harmonic') shown[cells[0]] = cells[cells.length - 1];
    }
    const model = await env.t.knex('models').where({ name }).first('id');
    const owner = await import('supertest').then((m) => m.default.agent(env.t.app));
    const csrf = (await owner.get('/api/auth/csrf')).body.csrfToken;
    await owner.post('/api/auth/login').set('X-CSRF-Token', csrf).send({ email: DEMO.planner, password: DEMO_PASSWORD });
    const detail = (await owner.get(`/api/models/${model.id}`)).body.model;
    const option = detail.options.find((o: { code: string }) => o.code === 'SIRED');
    const file = path.join(work, 'circuit.json');
    writeFileSync(file, JSON.stringify(option.engineInput.contract));
    const { stdout } = await run('npm', ['run', '--silent', 'profile', '--', file], { cwd: process.cwd() });
    const cli = JSON.parse(stdout) as { harmonics: { order: number; dbc: number }[]; thdF: number; thdR: number };
    expect(cli.harmonics).toHaveLength(10);
    for (const h of cli.harmonics) expect(shown[`H${h.order}`]).toBe(`${h.dbc.toFixed(2)} dBc`);
    expect(shown.THD_F).toBe(`${(cli.thdF * 100).toFixed(3)} %`);
    expect(shown.THD_R).toBe(`${(cli.thdR * 100).toFixed(3)} %`);
    // Silicon against an LED is asymmetric: even harmonics are present (H2 well above the symmetric floor).
    expect(cli.harmonics[1].dbc).toBeGreaterThan(-40);
    await page.close();
  }, 120_000);

  it('shows the parts list with low stock highlighted, and frozen revisions offer a new one', async () => {
    const page = await env.browser.newPage({ viewport: { width: 1366, height: 1000 } });
    await signIn(page, env.url, DEMO.planner);
    await page.goto(`${env.url}/catalog/parts`);
    const table = page.getByRole('table', { name: 'Parts with their stock' });
    await table.getByRole('link').first().waitFor();
    // The list is filtered on the server: count rows only once the filtered page has arrived.
    const filtered = page.waitForResponse((r) => r.url().includes('/api/parts?') && r.url().includes('lowStock=true'));
    await page.getByLabel('Only below reorder point').check();
    await filtered;
    await table.getByRole('link', { name: 'D-GE-PC' }).waitFor();
    await expect.poll(async () => (await table.getByRole('row').count()) - 1 - (await table.getByText('below reorder point').count())).toBe(0);
    expect(await table.getByText('below reorder point').count()).toBeGreaterThan(0);
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-parts-low-stock.png'), fullPage: true });
    const smd = await env.t.knex('models').where({ sku: 'HM-SMD' }).first('id');
    const rev1 = await env.t.knex('model_revisions').where({ model_id: smd.id, number: 1 }).first('id');
    await page.goto(`${env.url}/catalog/revisions/${rev1.id}`);
    await page.getByText(/Frozen since/).waitFor();
    expect(await page.getByRole('button', { name: /Start revision \d+ from this one/ }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save drive stage' }).count()).toBe(0);
    await page.getByRole('link', { name: 'Back to Saltmarsh Drive' }).click();
    const options = page.getByRole('table', { name: 'Clipping options of Saltmarsh Drive' });
    await options.getByRole('link', { name: 'Germanium pair (GE2)' }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-model.png'), fullPage: true });
    await page.getByRole('link', { name: /Revision 2/ }).click();
    const bom = page.getByRole('table', { name: 'BOM of revision 2' });
    const row = bom.getByRole('row').filter({ has: page.getByRole('cell', { name: 'R16', exact: true }) });
    await row.getByRole('button', { name: 'Edit' }).click();
    const dialog = page.getByRole('dialog', { name: 'Edit R-2K2-MF' });
    await dialog.getByLabel('Notes').fill('clipper series resistor, 1 % only');
    await dialog.getByRole('button', { name: 'Save line' }).click();
    await page.getByText('R-2K2-MF line saved').first().waitFor();
    await row.getByText('clipper series resistor, 1 % only').waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-revision.png'), fullPage: true });
    await page.close();
  }, 120_000);

  it('adds a custom device from datasheet points, draws I–V curves, and compares options on the same axes', async () => {
    const page = await env.browser.newPage({ viewport: { width: 1366, height: 1000 } });
    await signIn(page, env.url, DEMO.planner);
    await page.goto(`${env.url}/catalog/devices`);
    const library = page.getByRole('table', { name: 'Clipping device library' });
    await library.getByText('LED, red').waitFor();
    await page.getByLabel('Device name').fill(`Amber LED ${stamp}`);
    for (const [i, [vf, ma]] of [[1.72, 1], [1.88, 10], [1.99, 20]].entries()) {
      await page.getByLabel(`Vf ${i + 1} (V)`).fill(String(vf));
      await page.getByLabel('at (mA)').nth(i).fill(String(ma));
    }
    await page.getByRole('button', { name: 'Add device' }).click();
    // The fit reproduces the first two datasheet points (IS and N are solved from them).
    await page.getByText(`Amber LED ${stamp} added: Vf 1720 mV at 1 mA, 1880 mV at 10 mA`).waitFor();
    await library.getByText(`Amber LED ${stamp} (custom)`).waitFor();
    await page.getByRole('img', { name: 'Forward I–V curves at 27 °C' }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-devices.png'), fullPage: true });

    const cpd = await env.t.knex('models').where({ sku: 'HM-CPD' }).first('id');
    const ids = await env.t.knex('clipping_options').where({ model_id: cpd.id }).whereIn('code', ['RECT2', 'BLU2', 'GE2']).orderBy('position').pluck('id');
    await page.goto(`${env.url}/catalog/models/${cpd.id}/compare?options=${ids.join(',')}`);
    const side = page.getByRole('table', { name: 'Side by side at the reference setting' });
    await side.getByRole('row').nth(3).waitFor({ timeout: 30_000 });
    expect(await side.getByRole('row').count()).toBe(4);
    await page.getByRole('img', { name: 'THD_F against drive' }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, 'catalog-compare.png'), fullPage: true });
    await page.close();
  }, 90_000);
});
