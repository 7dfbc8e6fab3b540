import { describe, expect, it } from 'vitest';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { DEMO, signedInAgent } from '../support/app';
import { openNav, SCREENSHOTS, signedInPage, useBrowserApp } from '../support/browser';
import { makeCatalog, makePaidOrder } from '../api/production-fixture';

// Trays on a bench tablet (1024 × 768): Juno starts a tray and enters its readings slot by slot and
// by pasting a column; the planner matches a released batch from it; Juno builds a unit whose Vf
// readings come filled in from the tray.
const env = useBrowserApp();

const pageAs = (email: string, home: string) => signedInPage(env, email, { viewport: { width: 1024, height: 768 }, hasTouch: true, home });
const toast = (page: Page, text: RegExp) => page.getByText(text).first().waitFor({ timeout: 30_000 });

describe('trays in the browser', () => {
  it('enters a tray on a tablet, matches a batch from it and builds a unit with the tray’s Vf', async () => {
    // A released, kitted batch of two symmetric units for a paid order, both for Juno (set up through the API).
    const c = await makeCatalog(env.t.knex);
    const order = await makePaidOrder(env.t.knex, c.modelId, c.options.sym, 2);
    const planner = await signedInAgent(env.t.app, DEMO.planner);
    const { body: created } = await planner.post('/api/batches').set('X-CSRF-Token', planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
    const batchId = created.id as number;
    await planner.post(`/api/batches/${batchId}/release`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    await planner.post(`/api/batches/${batchId}/kit`).set('X-CSRF-Token', planner.csrf).send({}).expect(200);
    const junoId = (await env.t.knex('users').where({ email: DEMO.assembler }).first()).id;
    await planner.put(`/api/assemblers/${junoId}`).set('X-CSRF-Token', planner.csrf).send({ skills: ['through-hole', 'device-matching', 'enclosure'], dailyCapacityMinutes: 480 }).expect(200);
    const units = await env.t.knex('units').where({ batch_id: batchId }).orderBy('sequence');
    await planner.post(`/api/batches/${batchId}/assignments`).set('X-CSRF-Token', planner.csrf)
      .send({ builds: units.map((u) => ({ unitId: u.id, assemblerId: junoId, date: '2027-01-05' })) }).expect(200);
    const device = await env.t.knex('devices').where({ name: `Si ${c.tag}` }).first();

    // Juno on the tablet: a new tray, four readings typed with Enter, four pasted as a column.
    const juno = await pageAs(DEMO.assembler, '/builds');
    await openNav(juno);
    await juno.getByRole('link', { name: 'Device trays' }).click();
    await juno.getByRole('heading', { name: 'New tray' }).waitFor();
    await juno.getByLabel('Device').selectOption(String(device.id));
    await juno.getByLabel('Supplier lot').fill('L-2611-A');
    await juno.getByRole('button', { name: 'Start tray' }).click();
    await juno.waitForURL(/\/trays\/\d+$/);
    const trayId = Number(juno.url().split('/').pop());
    for (const [i, reading] of ['0.5912', '589.7', '0.5934', '0.5899'].entries()) {
      const field = juno.getByLabel(`Vf of T${trayId}-0${i + 1}`);
      await field.fill(reading);
      await field.press('Enter');
      await juno.getByText(`T${trayId}-0${i + 1} saved`).waitFor();
    }
    await juno.getByLabel('First slot').fill('5');
    await juno.getByLabel('Pasted readings').fill('0.5921\n0.5950\n0.5905\n0.7100\n');
    await juno.getByRole('button', { name: 'Save pasted readings' }).click();
    await toast(juno, /Saved 4 pasted readings/);
    // Eight readings; 0.7100 V sits far from this tray and is flagged.
    await juno.getByRole('cell', { name: `T${trayId}-08` }).waitFor();
    expect(await juno.getByText('1 reading flagged').count()).toBe(1);
    expect(await juno.getByRole('row', { name: new RegExp(`T${trayId}-08.*far from this tray`) }).count()).toBe(1);
    await juno.screenshot({ path: path.join(SCREENSHOTS, 'trays-tablet.png'), fullPage: true });
    await juno.screenshot({ path: path.resolve('docs/trays-tablet.png') });

    // The planner matches the batch from the tray.
    const desk = await pageAs(DEMO.planner, '/board');
    await desk.setViewportSize({ width: 1024, height: 768 });
    await desk.goto(`${env.url}/planning/${batchId}`);
    await desk.getByRole('heading', { name: 'Clipping devices from trays' }).waitFor();
    await desk.getByRole('button', { name: 'Propose matching' }).click();
    await desk.getByRole('table', { name: 'Proposed devices per unit' }).waitFor();
    await desk.getByText(/Predicted H2 matched/).waitFor();
    await desk.screenshot({ path: path.join(SCREENSHOTS, 'trays-matching.png'), fullPage: true });
    await desk.getByRole('button', { name: 'Accept matching' }).click();
    await toast(desk, /Devices matched for 2 units/);
    await desk.getByRole('heading', { name: 'Kit list: clipping devices from trays' }).waitFor();
    const slots = await env.t.knex('tray_slots').where({ unit_id: units[0].id }).orderBy('option_device_id');
    expect(slots).toHaveLength(2);
    const labels = slots.map((s) => `T${trayId}-${String(s.slot).padStart(2, '0')}`);
    await desk.getByText(`take ${labels.join(' and ')}`).waitFor();

    // Juno builds the first unit: the readings are filled in from the tray and the checklist names the slots.
    await juno.goto(`${env.url}/builds/${units[0].id}`);
    await juno.getByRole('heading', { name: 'Device matching' }).waitFor();
    for (const label of labels) await juno.getByText(`Take ${label} from its tray`).waitFor();
    const inputs = juno.getByLabel(/^Vf of Si/);
    expect(await inputs.count()).toBe(2);
    const positive = juno.getByLabel(/^Vf of Si .*, positive string #1/);
    expect(await positive.inputValue()).toBe(String(slots.find((s) => s.option_device_id === c.symDevices[0])!.vf));
    expect((await inputs.evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value))).sort()).toEqual(slots.map((s) => String(s.vf)).sort());
    await juno.screenshot({ path: path.join(SCREENSHOTS, 'trays-unit-prefilled.png'), fullPage: true });
    for (const [i] of c.steps.entries()) {
      await juno.getByRole('button', { name: `Start step ${i + 1}` }).click();
      await juno.getByRole('button', { name: `Finish step ${i + 1}` }).click();
      // Finished seconds after starting, far under the standard time: the tablet asks first.
      await juno.getByRole('button', { name: `Yes, step ${i + 1} is finished` }).click();
      await toast(juno, /Finished “/);
    }
    await juno.getByRole('button', { name: 'Save readings' }).click();
    await toast(juno, /Readings saved/);
    await juno.getByLabel(/^Lot of PCB/).fill('PCB-LOT-7');
    await juno.getByRole('button', { name: 'Save lots' }).click();
    await toast(juno, /lot/i);
    await juno.getByRole('button', { name: 'Mark build finished' }).click();
    await toast(juno, /is built and goes to the test bench/);
    const unit = await env.t.knex('units').where({ id: units[0].id }).first();
    expect(unit.state).toBe('built');
    const readings = await env.t.knex('unit_devices').where({ unit_id: units[0].id }).orderBy('option_device_id');
    expect(readings.map((r) => r.measured_vf)).toEqual(slots.map((s) => s.vf));
  }, 240_000);
});
