import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import path from 'node:path';
import nodemailer from 'nodemailer';
import type { Page } from 'playwright-core';
import { startMailFake, type MailFake } from '../../server/fakes/mail/index';
import { renderMail } from '../../server/services/mail/render';
import { createFormatter } from '../../shared/format';
import { insertPedal, placeOrder } from '../api/orders-fixtures';
import { DEMO, signedInAgent, uniqueEmail, type TestAgent } from '../support/app';
import { openNav, SCREENSHOTS, signedInPage, useBrowserApp } from '../support/browser';

// People & roles and the app's one voice, in Chromium at a desktop and a bench-tablet size:
// staff and customers listed apart, a role change confirmed old → new and undone, Deactivate
// behind a menu; dates from the one formatter, sentence-case histories, headings per role, the
// Sent mail preview that fits, device colours that follow the device, one cart button, serials
// and order numbers on one line, the shop's own words for device provenance and demo parts.
const SIZES = { desktop: { width: 1280, height: 800 }, tablet: { width: 1024, height: 768 } } as const;
type Size = keyof typeof SIZES;

// The mail fake starts first (the app reads its inbox) and, its afterAll registered first, closes last.
let mail: MailFake;
beforeAll(async () => {
  mail = await startMailFake({ smtpPort: 0, httpPort: 0 });
});
afterAll(async () => {
  await mail?.close();
});
const env = useBrowserApp({ env: () => ({ MAIL_INBOX_URL: mail.httpUrl }) });

let owner: TestAgent;
let orderNumber: string;
let orderId: number;

beforeAll(async () => {
  owner = await signedInAgent(env.t.app, DEMO.owner);
  const customer = await signedInAgent(env.t.app, DEMO.customer);
  const placed = await placeOrder(customer, await insertPedal(env.t.knex));
  orderNumber = placed.order.number;
  orderId = placed.order.id;
  // A staff note and a lower-case message as older code wrote them: both read in sentence case.
  await env.t.knex('order_events').insert({ order_id: orderId, kind: 'state-change', to_state: 'awaiting_payment', message: 'every unit passed its bench test' });
  // One real receipt through SMTP to the mail fake, as the outbox sends it.
  const rendered = renderMail('order-received', {
    customerName: 'Dee Castellano', orderNumber, orderUrl: `${env.url}/orders/${orderId}`, shopUrl: env.url,
    lines: [{ quantity: 1, description: 'Test pedal — LED pair', unitPriceCents: 17_900, lineTotalCents: 17_900 }],
    subtotalCents: 17_900, shippingCents: 900, taxCents: 3_000, totalCents: 18_800, pricesIncludeTax: true,
  }, { currency: 'EUR', timeZone: 'Europe/Berlin', shopName: 'Hollowmere Effects', shopAddress: 'Example Lane 1' });
  await nodemailer.createTransport({ host: '127.0.0.1', port: mail.smtpPort, secure: false, ignoreTLS: true })
    .sendMail({ from: 'shop@hollowmere.example', to: DEMO.customer, subject: rendered.subject, text: rendered.text, html: rendered.html });
});

const pageAs = (size: Size, email: string): Promise<Page> => signedInPage(env, email, { viewport: SIZES[size] });
const shot = (page: Page, name: string) => page.screenshot({ path: path.join(SCREENSHOTS, `${name}.png`), fullPage: true });
const roleOf = async (email: string) => (await env.t.knex('users').where({ email }).first('role')).role as string;

async function addPerson(role: string, name: string) {
  const email = uniqueEmail(role);
  await owner.post('/api/users').set('X-CSRF-Token', owner.csrf).send({ name, email, role, password: 'first-password-1' }).expect(201);
  return email;
}

/** Pixels of the canvas close to a colour (each channel within 40). */
async function pixelsNear(page: Page, hex: string): Promise<number> {
  return page.locator('figure canvas').first().evaluate((canvas: HTMLCanvasElement, colour: string) => {
    const [r, g, b] = [1, 3, 5].map((i) => parseInt(colour.slice(i, i + 2), 16));
    const { data } = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height);
    let n = 0;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i + 3] > 200 && Math.abs(data[i] - r) < 40 && Math.abs(data[i + 1] - g) < 40 && Math.abs(data[i + 2] - b) < 40) n++;
    }
    return n;
  }, hex);
}

for (const size of Object.keys(SIZES) as Size[]) {
  describe(`people & roles at ${size} size`, () => {
    it('lists staff and customers apart, confirms a role change old → new, undoes it, and deactivates from a menu', async () => {
      const name = `Wren Ottoline ${size}`;
      const email = await addPerson('assembler', name);
      const page = await pageAs(size, DEMO.owner);
      await page.goto(`${env.url}/users`);
      const staffTab = page.getByRole('tab', { name: /^Staff/ });
      await staffTab.waitFor();
      expect(await staffTab.getAttribute('aria-selected')).toBe('true');
      await page.getByRole('table', { name: 'Staff' }).waitFor();
      // No column of red buttons: Deactivate lives in each row's menu.
      expect(await page.getByRole('button', { name: 'Deactivate' }).count()).toBe(0);

      await page.getByLabel('Search staff').fill('Wren Ottoline');
      const select = page.getByLabel(`Role of ${name}`);
      await select.waitFor();
      expect(await page.getByRole('table', { name: 'Staff' }).getByRole('row').count()).toBeGreaterThanOrEqual(2);

      // Changing the list asks first; keeping it changes nothing.
      await select.selectOption('owner');
      const dialog = page.getByRole('dialog', { name: `Change ${name}’s role?` });
      await dialog.waitFor();
      await expect(dialog.textContent()).resolves.toContain('Assembler → Owner');
      await shot(page, `people-role-confirm-${size}`);
      await dialog.getByRole('button', { name: 'Keep it as it is' }).click();
      await dialog.waitFor({ state: 'hidden' });
      expect(await select.inputValue()).toBe('assembler');
      expect(await roleOf(email)).toBe('assembler');

      await select.selectOption('planner');
      await dialog.getByRole('button', { name: 'Make Wren planner' }).click();
      const notice = page.getByRole('status').filter({ hasText: `${name} is now planner (was assembler).` });
      await notice.waitFor();
      expect(await roleOf(email)).toBe('planner');
      await expect(notice.getByText(/\d+ s left to undo/).textContent()).resolves.toMatch(/^(60|59|58|57|56|55|5\d) s left/);
      await shot(page, `people-roles-${size}`);
      await notice.getByRole('button', { name: 'Undo' }).click();
      await page.getByText(`${name} is assembler again`).waitFor();
      expect(await roleOf(email)).toBe('assembler');

      // Deactivate from the row's menu, after a question.
      await page.getByRole('button', { name: `More for ${name}` }).click();
      await page.getByRole('menuitem', { name: 'Deactivate…' }).click();
      const ask = page.getByRole('dialog', { name: `Deactivate ${name}?` });
      await ask.getByRole('button', { name: 'Deactivate' }).click();
      await page.getByText(`${name} is deactivated and signed out everywhere`).waitFor();
      expect((await env.t.knex('users').where({ email }).first('active')).active).toBe(false);

      // Customers have their own list, searchable, with no role column.
      await page.getByRole('tab', { name: /^Customers/ }).click();
      const customers = page.getByRole('table', { name: 'Customers' });
      await customers.waitFor();
      await page.getByLabel('Search customers').fill('customer@shop');
      await customers.getByRole('cell', { name: DEMO.customer }).waitFor();
      expect(await customers.getByRole('columnheader', { name: /Role/ }).count()).toBe(0);
      await shot(page, `people-customers-${size}`);
      await page.close();
    });
  });

  describe(`one voice at ${size} size`, () => {
    it('shows dates from the one formatter, sentence-case history and the staff heading; order numbers stay on one line', async () => {
      const order = await env.t.knex('orders').where({ id: orderId }).first('created_at');
      const placed = createFormatter({ timeZone: 'Europe/Berlin', currency: 'EUR' }).dateTime(order.created_at);

      const customer = await pageAs(size, DEMO.customer);
      await customer.goto(`${env.url}/orders/${orderId}`);
      await customer.getByRole('heading', { name: 'Your pedals on the bench' }).waitFor();
      await customer.getByText(`Placed ${placed}`).waitFor();
      await customer.goto(`${env.url}/orders`);
      const heading = customer.getByRole('heading', { name: `Order ${orderNumber}` });
      await heading.waitFor();
      // The order number is one box on one line, whatever the width.
      const number = heading.locator('.ident');
      expect(await number.evaluate((el) => [getComputedStyle(el).whiteSpace, el.getClientRects().length])).toEqual(['nowrap', 1]);
      expect(await customer.locator('main').textContent()).not.toMatch(/\b\d{4}-\d{2}-\d{2}\b|\b\d{1,2}\/\d{1,2}\/\d{4}\b/);
      await customer.close();

      const staff = await pageAs(size, DEMO.owner);
      await staff.goto(`${env.url}/orders/${orderId}`);
      await staff.getByRole('heading', { name: 'Units for this order' }).waitFor();
      expect(await staff.getByRole('heading', { name: 'Your pedals on the bench' }).count()).toBe(0);
      const history = staff.getByRole('table', { name: `History of order ${orderNumber}` });
      await history.getByRole('cell', { name: 'Order placed' }).first().waitFor();
      await history.getByRole('cell', { name: 'Every unit passed its bench test' }).waitFor();
      const rows = await history.locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.querySelectorAll('td')].slice(1, 3).map((td) => td.textContent ?? '')));
      for (const cells of rows) for (const text of cells) if (text) expect(text[0]).toBe(text[0].toUpperCase());
      await shot(staff, `order-staff-${size}`);
      await staff.close();
    });

    it('calls it Sent mail, and the preview of a mail fits the screen', async () => {
      const page = await pageAs(size, DEMO.planner);
      await openNav(page);
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Sent mail' }).click();
      await page.getByRole('heading', { name: 'Sent mail', level: 1 }).waitFor();
      await page.getByRole('button', { name: `Receipt for order ${orderNumber}` }).first().click();
      const frame = page.getByTitle(/^HTML part of Receipt for order/);
      await frame.waitFor();
      const box = (await frame.boundingBox())!;
      // The mail is drawn 600 px wide: the whole preview is on screen and at least that wide.
      expect(box.width).toBeGreaterThanOrEqual(600);
      expect(box.x + box.width).toBeLessThanOrEqual(SIZES[size].width);
      await shot(page, `sent-mail-${size}`);
      await page.close();
    });

    it('draws each device in its own colour, with its box ticked, and names provenance in the shop’s words', async () => {
      const page = await pageAs(size, DEMO.planner);
      await page.goto(`${env.url}/catalog/devices`);
      await page.getByRole('table', { name: 'Clipping device library' }).waitFor();
      // The curves drawn at first are exactly the ticked ones.
      const ticked = await page.getByRole('checkbox', { name: /^Show .* on the chart$/ }).evaluateAll((boxes) => boxes.filter((b) => (b as HTMLInputElement).checked).length);
      expect(ticked).toBe(5);
      const only = async (device: string) => {
        for (const box of await page.getByRole('checkbox', { name: /^Show .* on the chart$/ }).all()) if (await box.isChecked()) await box.uncheck();
        await page.getByRole('checkbox', { name: `Show ${device} on the chart` }).check();
        await page.waitForTimeout(300);
      };
      await only('LED, blue');
      expect(await pixelsNear(page, '#2563d9')).toBeGreaterThan(100);
      expect(await pixelsNear(page, '#d42a2a')).toBe(0);
      await only('LED, red');
      expect(await pixelsNear(page, '#d42a2a')).toBeGreaterThan(100);
      expect(await pixelsNear(page, '#2563d9')).toBe(0);
      await only('LED, white');
      // Grey on the white chart, not white on white.
      expect(await pixelsNear(page, '#8a949c')).toBeGreaterThan(50);
      await page.getByRole('checkbox', { name: 'Show LED, blue on the chart' }).check();
      await page.getByRole('checkbox', { name: 'Show LED, red on the chart' }).check();
      await page.getByText('Where the numbers come from').click();
      const notes = await page.locator('details li').allTextContents();
      expect(notes.length).toBeGreaterThan(0);
      for (const note of notes.filter((n) => !n.includes('(custom)'))) expect(note).not.toMatch(/from memory|recalled/);
      expect(notes.filter((n) => n.includes('not measured here')).length).toBeGreaterThanOrEqual(9);
      await shot(page, `devices-${size}`);
      await page.close();
    });

    it('names demo enclosures by their dimensions, and shows one cart button', async () => {
      const page = await pageAs(size, DEMO.planner);
      await page.goto(`${env.url}/catalog/parts`);
      await page.getByLabel(/Search/).first().fill('ENC-');
      const parts = page.getByRole('table').first();
      await parts.getByText('ENC-122X66').waitFor();
      expect(await page.locator('main').textContent()).not.toMatch(/1590|125B/);
      await page.close();

      const visitor = await env.browser.newPage({ viewport: SIZES[size] });
      const { models } = (await (await fetch(`${env.url}/api/models`)).json()) as { models: { id: number }[] };
      await visitor.goto(`${env.url}/shop/${models[0].id}`);
      await visitor.getByRole('group', { name: 'Choose a clipping option' }).waitFor();
      expect(await visitor.getByRole('link', { name: /cart/i }).count()).toBe(1);
      await visitor.close();

      const customer = await pageAs(size, DEMO.customer);
      await customer.goto(`${env.url}/shop`);
      await customer.getByRole('heading', { name: 'Pedals' }).waitFor();
      await openNav(customer);
      expect(await customer.getByRole('link', { name: /cart/i }).count()).toBe(1);
      await shot(customer, `shop-customer-${size}`);
      await customer.close();
    });
  });
}
