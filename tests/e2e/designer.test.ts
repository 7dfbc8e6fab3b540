import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { DEMO } from '../support/app';
import { SCREENSHOTS, signIn, useBrowserApp } from '../support/browser';

const env = useBrowserApp();

describe('the option designer in a browser', () => {
  it('the owner runs a small search, cancels a large one, and creates an option from a candidate', async () => {
    const page = await env.browser.newPage({ viewport: { width: 1366, height: 1100 } });
    await signIn(page, env.url, DEMO.owner);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Pedal models' }).click();
    await page.getByRole('table', { name: 'Pedal models' }).getByRole('link', { name: 'Saltmarsh Drive' }).click();
    await page.getByRole('link', { name: 'Design an option' }).click();
    await page.getByRole('heading', { name: /Design an option/ }).waitFor();

    // A large search (4 per side, seven resistor values, both topologies) is cancelled from its progress
    // bar. Other test files add stocked devices to the library (copies of the same parameters among
    // them), so the search is counted on the page and its bar shows at once, at 0 of that count.
    await page.getByLabel('Devices', { exact: true }).selectOption('stocked');
    await page.getByLabel('Devices in series per side, up to').fill('4');
    await page.getByLabel('Series resistor from (Ω)').fill('1000');
    await page.getByLabel('Series resistor to (Ω)').fill('10000');
    await page.getByLabel('Feedback', { exact: true }).check();
    await page.getByRole('button', { name: 'Search' }).click();
    const bar = page.getByRole('progressbar', { name: 'Candidates computed' });
    await bar.waitFor();
    // The bar's maximum is the whole space: ≥ 8 distinct stocked devices in the demo seeds, 4 per side.
    await expect.poll(async () => Number(await bar.getAttribute('max'))).toBeGreaterThan(1000);
    await page.getByRole('button', { name: 'Cancel' }).click();
    await page.getByText(/^Cancelled: [\d,]+ of [\d,]+ candidates computed/).waitFor({ timeout: 30_000 });

    // A small one runs to the end: stocked devices, one per side, shunt at three E6 values.
    await page.getByLabel('Devices', { exact: true }).selectOption('stocked');
    await page.getByLabel('Devices in series per side, up to').fill('1');
    await page.getByLabel('Feedback', { exact: true }).uncheck();
    await page.getByLabel('Series resistor from (Ω)').fill('2200');
    await page.getByLabel('Series resistor to (Ω)').fill('4700');
    await page.getByLabel('THD_F from (%)').fill('0');
    await page.getByLabel('THD_F to (%)').fill('100');
    // The onset anywhere on the control and any THD_F at full drive: every candidate still meets the target,
    // and each row shows its onset and its THD_F at the second drive.
    await page.getByLabel('Clipping onset from (% drive)').fill('0');
    await page.getByLabel('Clipping onset to (% drive)').fill('100');
    await page.getByLabel('Second drive (%)').fill('100');
    await page.getByLabel('THD_F there from (%)').fill('0');
    await page.getByLabel('THD_F there to (%)').fill('100');
    await page.getByRole('button', { name: 'Search' }).click();
    const results = page.getByRole('region', { name: 'Design results' });
    await results.waitFor({ timeout: 60_000 });
    const summary = await results.getByText(/candidates computed/).textContent();
    // Counts are written with the shop's thousands separator (en-GB: 1,452).
    const [searched, total] = (/([\d,]+) of ([\d,]+) candidates/.exec(summary ?? '') ?? []).slice(1).map((n) => n.replace(/,/g, ''));
    expect(Number(searched)).toBe(Number(total));
    // n distinct stocked devices: n(n + 1)/2 pairs without mirror images, × 3 resistors (2200, 3300, 4700).
    const pairs = Number(total) / 3;
    expect(Math.sqrt(8 * pairs + 1) % 1).toBe(0);
    const table = results.getByRole('table', { name: 'The nearest ten' });
    const rows = table.getByRole('row');
    expect(await rows.count()).toBe(1 + Math.min(10, Number(total)));
    // Cells by their column's heading (onset and second-drive columns show only when the target asks for them).
    const headings = (await table.getByRole('columnheader').allTextContents()).map((h) => h.trim());
    const first = rows.nth(1).getByRole('cell');
    const cell = (heading: string) => {
      expect(headings).toContain(heading);
      return first.nth(headings.indexOf(heading)).textContent();
    };
    await expect(cell('Distance')).resolves.toBe('0.000');
    expect(await cell('Onset')).toMatch(/^(\d+ %|never)$/);
    expect(await cell('THD_F at 2nd drive')).toMatch(/%$/);
    // The demo seeds link every stocked device to a part with a cost: the parts added (one line per part) and their cost show.
    expect(await cell('Circuit and parts')).toMatch(/^Shunt, .+\+ 1× .+− 1× .+Adds \d × \S+/);
    expect(await cell('Parts cost')).toMatch(/\d/);
    const surcharge = await cell('Suggested surcharge');
    await page.screenshot({ path: path.join(SCREENSHOTS, 'designer.png'), fullPage: true });
    // At 1366 × 768 the whole table fits its column (nothing to scroll sideways); the screenshot is kept in docs/.
    await page.setViewportSize({ width: 1366, height: 768 });
    await table.evaluate((t) => t.scrollIntoView({ block: 'start' }));
    const overflow = await table.evaluate((t) => t.parentElement!.scrollWidth - t.parentElement!.clientWidth);
    expect(overflow).toBe(0);
    await page.screenshot({ path: path.resolve('docs/designer-results-1366.png') });

    await rows.nth(1).getByRole('button', { name: 'Create option' }).click();
    await page.waitForURL(/\/catalog\/models\/\d+\/options\/\d+$/);
    await page.getByRole('heading', { name: /Designed 1: 1× .+ \/ 1× / }).waitFor();
    // The created option carries the suggested surcharge.
    expect(await page.getByText('Surcharge', { exact: true }).locator('xpath=following-sibling::dd').textContent()).toBe(surcharge);
    await page.close();
  });
});
