import { describe, expect, it } from 'vitest';
import { renderMail, renderString, TEMPLATES } from '../../server/services/mail/render';

const ctx = { currency: 'EUR', timeZone: 'Europe/Berlin', shopName: 'Hollowmere Effects', shopAddress: 'Kiln Yard 7 · Berlin' };
// Invented sample data covering every field the templates document at their top.
const sample = {
  name: 'Ines Falk', shopUrl: 'http://127.0.0.1:3000', customerName: 'Ines Falk', orderNumber: 'HM-10042', orderUrl: 'http://127.0.0.1:3000/orders/42',
  lines: [{ description: 'Saltmarsh Drive — Silicon pair', quantity: 2, unitPriceCents: 18_900, lineTotalCents: 37_800, taxRate: '19 %', taxCents: 6_035 }],
  subtotalCents: 37_800, shippingCents: 900, taxCents: 6_179, totalCents: 38_700, pricesIncludeTax: true, taxRate: '19 %', taxNote: '',
  invoiceNumber: 'INV-000042', creditNoteNumber: 'CN-000007',
  reason: 'your bank declined it.', batchCode: 'B-2026-12', estimatedShipDate: '2026-12-18', serial: 'HM-SMD-0007',
  description: 'Saltmarsh Drive — Silicon pair', testedAt: '2026-12-15T10:00:00Z', hasSpecSheet: true, carrier: 'Parcelwing', tracking: 'PW 4471 0093 22', amountCents: 38_700,
  resetUrl: 'http://127.0.0.1:3000/reset-password?token=sample-token', validMinutes: 60,
};

describe('mail templates', () => {
  for (const name of TEMPLATES) {
    it(`renders ${name} in both parts with nothing left unfilled`, () => {
      const mail = renderMail(name, sample, ctx);
      expect(mail.subject.length).toBeGreaterThan(5);
      expect(mail.subject).not.toMatch(/\{\{|\}\}/);
      for (const part of [mail.text, mail.html]) {
        expect(part).not.toMatch(/\{\{|\}\}/);
        expect(part).toContain('Hollowmere Effects');
      }
      expect(mail.html).toMatch(/^<!doctype html>/);
      expect(mail.html).not.toContain('data:'); // the field documentation comment is stripped
    });
  }

  it('formats money and dates in the shop’s currency and time zone, and fills the receipt', () => {
    const mail = renderMail('order-received', sample, ctx);
    expect(mail.text).toContain('2 × Saltmarsh Drive — Silicon pair at €189.00 = €378.00 (VAT 19 %)');
    expect(mail.text).toContain('VAT included (19 %): €61.79');
    expect(mail.text).toContain('Your invoice INV-000042 is attached');
    expect(renderMail('order-scheduled', sample, ctx).text).toContain('18 Dec 2026');
    // 23:30 UTC on 31 Dec is already 1 Jan in Berlin.
    expect(renderString('{{date d}}', { d: '2026-12-31T23:30:00Z' }, ctx, false)).toBe('1 Jan 2027');
  });

  it('escapes data in HTML but not in plain text, and handles #if/else and empty lists', () => {
    expect(renderString('<p>{{x}}</p>', { x: '<b>&"' }, ctx, true)).toBe('<p>&lt;b&gt;&amp;&quot;</p>');
    expect(renderString('{{x}}', { x: '<b>' }, ctx, false)).toBe('<b>');
    expect(renderString('{{#if a}}yes{{else}}no{{/if}}', { a: false }, ctx, false)).toBe('no');
    expect(renderString('[{{#each l}}{{n}},{{/each}}]', { l: [] }, ctx, false)).toBe('[]');
    expect(renderString('{{missing.path}}', {}, ctx, false)).toBe('');
  });

  it('refuses an unknown template instead of sending an empty mail', () => {
    expect(() => renderMail('order-recieved', sample, ctx)).toThrow(/Unknown mail template/);
  });
});
