import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getCarriers, getSettings } from '../../server/services/settings';
import { trackingUrl } from '../../shared/schemas/settings';
import { anonymousAgent, DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';

const t = startTestApp();
let owner: TestAgent;
let ownerId: number;
let snapshot: Record<string, unknown>;

// A real 1×1 PNG (the type check reads the file's structure).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==', 'base64');

const patch = (body: unknown) => owner.patch('/api/settings').set('X-CSRF-Token', owner.csrf).send(body as object);

beforeAll(async () => {
  owner = await signedInAgent(t.app, DEMO.owner);
  ownerId = (await t.knex('users').where({ email: DEMO.owner }).first('id')).id;
  snapshot = (await owner.get('/api/settings').expect(200)).body;
});

afterAll(async () => {
  // Put back what this file changed so later files see the demo settings.
  const { shopName, shopEmail, shopAddress, vatId, publicUrl, locale, fastStepPercent, thdTolerancePercent, shippingZones, carriers } = snapshot as Record<string, unknown>;
  await patch({ shopName, shopEmail, shopAddress, vatId, publicUrl, locale, fastStepPercent, thdTolerancePercent, shippingZones, carriers }).expect(200);
  await t.stop();
});

describe('owner settings', () => {
  it('are the owner’s alone: others get 403, visitors 401', async () => {
    for (const who of ['planner', 'assembler', 'tester', 'customer'] as const) {
      const agent = await signedInAgent(t.app, DEMO[who]);
      expect((await agent.get('/api/settings')).status).toBe(403);
      expect((await agent.patch('/api/settings').set('X-CSRF-Token', agent.csrf).send({ shopName: 'Taken over' })).status).toBe(403);
      expect((await agent.put('/api/settings/logo').set('X-CSRF-Token', agent.csrf).attach('logo', PNG, 'logo.png')).status).toBe(403);
    }
    const visitor = await anonymousAgent(t.app);
    expect((await visitor.get('/api/settings')).status).toBe(401);
    expect((await getSettings(t.knex)).shop_name).not.toBe('Taken over');
  });

  it('shows every field the screen edits, with the demo carriers and zones', async () => {
    const s = snapshot as Record<string, unknown>;
    for (const key of ['shopName', 'shopEmail', 'shopAddress', 'vatId', 'publicUrl', 'serialPrefix', 'orderNumberPrefix', 'timeZone', 'locale',
      'labourCentsPerHour', 'homeCountry', 'ossOverThreshold', 'pricesIncludeTax', 'shippingZones', 'vfTestCurrentMa', 'thdTolerancePercent', 'harmonicToleranceDb',
      'maxCurrentDrawMa', 'fastStepPercent', 'paperSize', 'sheetStaffNames', 'carriers', 'logoUrl', 'changes']) {
      expect(s, key).toHaveProperty(key);
    }
    expect(s.fastStepPercent).toBe(25);
    expect((s.carriers as unknown[]).length).toBeGreaterThan(0);
  });

  it('changes only the named fields and audits each change: who, when, old → new', async () => {
    const before = await getSettings(t.knex);
    const started = new Date(Date.now() - 1000);
    const res = await patch({ shopName: 'Hollowmere Effects Werkstatt', locale: 'de-DE', fastStepPercent: 30, vatId: 'de123456789' }).expect(200);
    expect(res.body).toMatchObject({ shopName: 'Hollowmere Effects Werkstatt', locale: 'de-DE', fastStepPercent: 30, vatId: 'DE123456789' });
    expect(res.body.serialPrefix).toBe(before.serial_prefix);
    const rows = await t.knex('settings_audit').where('changed_at', '>=', started).orderBy('id');
    const byField = Object.fromEntries(rows.map((r) => [r.field, r]));
    expect(byField.shopName).toMatchObject({ user_id: ownerId, old_value: before.shop_name, new_value: 'Hollowmere Effects Werkstatt' });
    expect(byField.locale).toMatchObject({ old_value: before.locale, new_value: 'de-DE' });
    expect(byField.fastStepPercent).toMatchObject({ old_value: before.fast_step_percent, new_value: 30 });
    expect(byField.serialPrefix).toBeUndefined();
    // The screen lists the change with the owner's name.
    const again = await owner.get('/api/settings').expect(200);
    expect(again.body.changes[0]).toMatchObject({ userName: 'Maren Holt' });
    expect(again.body.changes.map((c: { field: string }) => c.field)).toContain('shopName');
    // An unchanged value writes no audit row.
    const count = rows.length;
    await patch({ shopName: 'Hollowmere Effects Werkstatt' }).expect(200);
    expect(Number((await t.knex('settings_audit').where('changed_at', '>=', started).count({ n: '*' }).first())?.n)).toBe(count);
  });

  it('publishes the identity and locale to visitors, never the owner-only figures', async () => {
    const visitor = await anonymousAgent(t.app);
    const res = await visitor.get('/api/settings/public').expect(200);
    expect(res.body).toMatchObject({ shopName: 'Hollowmere Effects Werkstatt', locale: 'de-DE', vatId: 'DE123456789' });
    expect(res.body.shippingCountries).toContain('DE');
    expect(res.body).not.toHaveProperty('labourCentsPerHour');
    expect(res.body).not.toHaveProperty('changes');
  });

  it('refuses bad values with a message per field and changes nothing', async () => {
    const before = await getSettings(t.knex);
    const res = await patch({
      shopName: '', shopEmail: 'not-mail', vatId: '12', publicUrl: 'ftp://x', serialPrefix: 'H1', locale: 'not a locale!', timeZone: 'Mars/Olympus',
      homeCountry: 'CH', fastStepPercent: 101, thdTolerancePercent: 0, harmonicToleranceDb: 0, vfTestCurrentMa: -1, paperSize: 'A3',
      shippingZones: [{ name: 'A', countries: ['DE'], rateCents: 100 }, { name: 'B', countries: ['FR', 'DE'], rateCents: -5 }],
      carriers: [{ name: 'Slow Post', trackingUrlTemplate: 'https://slow.example/track', active: true }],
    }).expect(400);
    const f = res.body.error.fields;
    expect(f.shopName).toMatch(/name/);
    expect(f.shopEmail).toMatch(/e-mail/);
    expect(f.vatId).toMatch(/VAT id/);
    expect(f.publicUrl).toBeDefined();
    expect(f.serialPrefix).toMatch(/letters/);
    expect(f.locale).toMatch(/language tag/);
    expect(f.timeZone).toMatch(/time zone/);
    expect(f.homeCountry).toMatch(/EU country/);
    expect(f.fastStepPercent).toMatch(/100/);
    expect(f.harmonicToleranceDb).toMatch(/0\.5 dB/);
    expect(f.paperSize).toMatch(/A4 or Letter/);
    expect(f['shippingZones.1.countries.1']).toMatch(/DE is already in zone 1/);
    expect(f['shippingZones.1.rateCents']).toMatch(/negative/);
    expect(f['carriers.0.trackingUrlTemplate']).toMatch(/\{tracking\}/);
    expect((await patch({}).expect(400)).body.error.fields._).toMatch(/at least one/);
    expect(await getSettings(t.knex)).toEqual(before);
  });

  it('keeps carriers by id, deactivates a dropped one, and builds tracking links from the template', async () => {
    const current = (await owner.get('/api/settings').expect(200)).body.carriers as { id: number; name: string; trackingUrlTemplate: string; active: boolean }[];
    const [first, ...rest] = current;
    const res = await patch({
      carriers: [{ ...first, name: `${first.name} Express` }, { name: 'Moorland Freight', trackingUrlTemplate: 'https://moorland.example/t/{tracking}?lang=en', active: true }],
    }).expect(200);
    const after = res.body.carriers as typeof current;
    expect(after.find((c) => c.id === first.id)).toMatchObject({ name: `${first.name} Express`, active: true });
    for (const r of rest) expect(after.find((c) => c.id === r.id)).toMatchObject({ active: false });
    const added = after.find((c) => c.name === 'Moorland Freight')!;
    expect(added.active).toBe(true);
    const active = await getCarriers(t.knex, { activeOnly: true });
    expect(active.map((c) => c.id).sort()).toEqual([first.id, added.id].sort());
    // The tracking number is URL-encoded into the placeholder.
    expect(trackingUrl(added.trackingUrlTemplate, 'AB 12/3')).toBe('https://moorland.example/t/AB%2012%2F3?lang=en');
    const audit = await t.knex('settings_audit').where({ field: 'carriers' }).orderBy('id', 'desc').first();
    expect(audit.old_value).toEqual(current);
    expect(audit.new_value).toEqual(after);
    // A carrier id that does not exist is a 404 and changes nothing.
    await patch({ carriers: [{ id: 2147483647, name: 'Ghost', trackingUrlTemplate: 'https://g.example/{tracking}', active: true }] }).expect(404);
    expect((await getCarriers(t.knex)).map((c) => c.name)).not.toContain('Ghost');
  });

  it('replaces the shipping zones, and the cart then ships only there', async () => {
    await patch({ shippingZones: [{ name: 'Home', countries: ['de'], rateCents: 450 }, { name: 'Far', countries: ['US', 'JP'], rateCents: 3500 }] }).expect(200);
    const visitor = await anonymousAgent(t.app);
    expect((await visitor.get('/api/settings/public').expect(200)).body.shippingCountries).toEqual(['DE', 'JP', 'US']);
  });

  it('takes a PNG logo through the upload, serves it, and refuses other files and big ones', async () => {
    const notImage = await owner.put('/api/settings/logo').set('X-CSRF-Token', owner.csrf).attach('logo', Buffer.from('<svg/>'), { filename: 'logo.png', contentType: 'image/png' });
    expect(notImage.status).toBe(400);
    expect(notImage.body.error.fields.logo).toMatch(/PNG or JPEG/);
    const big = await owner.put('/api/settings/logo').set('X-CSRF-Token', owner.csrf).attach('logo', Buffer.concat([PNG, Buffer.alloc(600 * 1024)]), { filename: 'big.png', contentType: 'image/png' });
    expect(big.status).toBe(413);
    const ok = await owner.put('/api/settings/logo').set('X-CSRF-Token', owner.csrf).attach('logo', PNG, { filename: 'logo.png', contentType: 'image/png' }).expect(200);
    expect(ok.body.logoUrl).toMatch(/^\/api\/settings\/logo/);
    const visitor = await anonymousAgent(t.app);
    const served = await visitor.get(ok.body.logoUrl).expect(200);
    expect(served.headers['content-type']).toBe('image/png');
    expect(Buffer.compare(served.body as Buffer, PNG)).toBe(0);
    expect(await t.knex('settings_audit').where({ field: 'logo' }).orderBy('id', 'desc').first()).toMatchObject({ user_id: ownerId, new_value: { filename: 'logo.png' } });
    await owner.delete('/api/settings/logo').set('X-CSRF-Token', owner.csrf).expect(200);
    expect((await visitor.get('/api/settings/logo')).status).toBe(404);
  });
});
