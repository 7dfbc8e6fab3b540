import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { anonymousAgent, startTestApp, type TestAgent } from '../support/app';
import { insertPedal, type PedalFixture } from './orders-fixtures';

// VAT by destination for the demo shop (Germany, prices include VAT, over the EU distance-selling
// threshold). Expected standard rates: Germany 19 %, France 20 %, Italy 22 % — the rates table
// in shared/tax/vat-rates.ts names its source (the European Commission's published list of VAT
// rates in the member states); the values there, and so these, were written from memory.
const t = startTestApp();
let visitor: TestAgent;
let pedal: PedalFixture;

beforeAll(async () => {
  visitor = await anonymousAgent(t.app);
  pedal = await insertPedal(t.knex, 23_800); // invented test price
});
afterAll(async () => {
  await t.knex('settings').where({ id: 1 }).update({ oss_over_threshold: true });
  await t.stop();
});

const quote = (body: Record<string, unknown>) => visitor.post('/api/shop/quote').set('X-CSRF-Token', visitor.csrf)
  .send({ lines: [{ modelId: pedal.modelId, optionId: pedal.options.silicon, quantity: 2 }], ...body });

const zoneRate = async (country: string) => (await t.knex('shipping_zones').whereRaw('? = ANY(countries)', [country]).first('rate_cents')).rate_cents as number;
const net = (gross: number) => Math.round((gross * 10_000) / 11_900); // the catalog price without German VAT

describe('VAT by destination on the quote', () => {
  it('charges German VAT at home, keeping the tax-inclusive price to the cent', async () => {
    const res = await quote({ country: 'DE' }).expect(200);
    const line = res.body.lines[0];
    expect(res.body).toMatchObject({ country: 'DE', taxRateBasisPoints: 1900, taxRegime: 'domestic', taxNote: '' });
    expect(line).toMatchObject({ unitPriceCents: 23_800, netCents: net(47_600), taxRateBasisPoints: 1900, taxCents: 47_600 - net(47_600), lineTotalCents: 47_600 });
    expect(res.body.totalCents).toBe(47_600 + (await zoneRate('DE')));
  });

  it.each([
    ['FR', 2000],
    ['IT', 2200],
  ])('charges %s consumers their own standard rate under the one-stop shop', async (country, rate) => {
    const res = await quote({ shipping: { country: country.toLowerCase() } }).expect(200);
    const line = res.body.lines[0];
    const lineNet = net(47_600);
    const lineTax = Math.round((lineNet * rate) / 10_000);
    expect(res.body).toMatchObject({ country, taxRateBasisPoints: rate, taxRegime: 'eu-destination' });
    expect(res.body.taxNote).toMatch(/one-stop shop/);
    expect(line).toMatchObject({ netCents: lineNet, taxRateBasisPoints: rate, taxCents: lineTax, lineTotalCents: lineNet + lineTax });
    const ship = await zoneRate(country);
    const shipTax = Math.round((net(ship) * rate) / 10_000);
    expect(res.body).toMatchObject({ shippingNetCents: net(ship), shippingTaxCents: shipTax, taxCents: lineTax + shipTax, totalCents: lineNet + lineTax + net(ship) + shipTax });
  });

  it.each(['CH', 'US'])('zero-rates an export to %s, with a note', async (country) => {
    const res = await quote({ country }).expect(200);
    expect(res.body).toMatchObject({ country, taxRateBasisPoints: 0, taxRegime: 'export', taxCents: 0 });
    expect(res.body.taxNote).toMatch(/Export outside the EU: zero-rated/);
    expect(res.body.lines[0]).toMatchObject({ netCents: net(47_600), taxCents: 0, taxRateBasisPoints: 0, lineTotalCents: net(47_600) });
    expect(res.body.totalCents).toBe(net(47_600) + net(await zoneRate(country)));
  });

  it('charges the home rate across the EU for a shop under the distance-selling threshold', async () => {
    await t.knex('settings').where({ id: 1 }).update({ oss_over_threshold: false });
    const res = await quote({ country: 'FR' }).expect(200);
    expect(res.body).toMatchObject({ taxRateBasisPoints: 1900, taxRegime: 'eu-home-rate', subtotalCents: 47_600 });
    await t.knex('settings').where({ id: 1 }).update({ oss_over_threshold: true });
  });

  it('quotes the home country without a destination, and refuses one the shop does not ship to', async () => {
    expect((await quote({}).expect(200)).body).toMatchObject({ country: 'DE', taxRegime: 'domestic' });
    const res = await quote({ country: 'AQ' }).expect(400);
    expect(res.body.error.fields.country).toMatch(/do not ship to AQ/);
    const viaShipping = await quote({ shipping: { country: 'AQ' } }).expect(400);
    expect(viaShipping.body.error.fields['shipping.country']).toMatch(/do not ship to AQ/);
    expect((await quote({ country: 'Germany' }).expect(400)).body.error.fields.country).toMatch(/two-letter/);
  });
});
