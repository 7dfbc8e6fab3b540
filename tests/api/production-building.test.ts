import { describe, expect, it } from 'vitest';
import wavefile from 'wavefile';
import { DEMO, signedInAgent } from '../support/app';
import { makeCatalog, makePaidOrder } from './production-fixture';
import { buildAsJuno, junoId, readyJuno, useProductionApp } from './production-setup';

const { t, crew } = useProductionApp(['planner', 'juno', 'priya', 'tester']);
const { WaveFile } = wavefile;

/** A released, kitted batch for one paid order of `quantity` units, every unit assigned to Juno. */
async function releasedOrderBatch(quantity: number) {
  const c = await makeCatalog(t.knex);
  const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, quantity);
  const { body } = await crew.planner.post('/api/batches').set('X-CSRF-Token', crew.planner.csrf).send({ revisionId: c.revisionId, orderLineIds: [order.lineId] }).expect(201);
  await crew.planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
  const units = await t.knex('units').where({ batch_id: body.id }).orderBy('sequence');
  const assemblerId = await readyJuno(t.knex, crew.planner);
  await crew.planner.post(`/api/batches/${body.id}/assignments`).set('X-CSRF-Token', crew.planner.csrf)
    .send({ builds: units.map((u) => ({ unitId: u.id, assemblerId, date: '2027-01-05' })) }).expect(200);
  return { c, order, batchId: body.id as number, units };
}

function tone(thdShape: { h2: number; h3: number }, sampleRate = 48000, seconds = 0.5, channels = 1) {
  const n = Math.round(sampleRate * seconds);
  const s = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const x = (2 * Math.PI * 1000 * i) / sampleRate;
    s[i] = Math.round(20000 * (Math.sin(x) + thdShape.h2 * Math.sin(2 * x) + thdShape.h3 * Math.sin(3 * x)) / 1.3);
  }
  const wav = new WaveFile();
  wav.fromScratch(channels, sampleRate, '16', channels === 1 ? s : Array.from({ length: channels }, () => s));
  return Buffer.from(wav.toBuffer());
}

describe('building, testing and shipping a unit', () => {
  it('only kitted units can be built, and only by their own assembler', async () => {
    const { units } = await releasedOrderBatch(1);
    const notKitted = await crew.juno.post(`/api/units/${units[0].id}/steps/${(await t.knex('build_steps').first()).id}/start`).set('X-CSRF-Token', crew.juno.csrf).send({});
    expect([404, 409]).toContain(notKitted.status);
    const other = await crew.priya.get(`/api/units/${units[0].id}`);
    expect(other.status).toBe(403);
    // The queue is paged; a search by serial finds the unit whatever else is queued.
    const queue = await crew.priya.get(`/api/builds?q=${units[0].serial}`).expect(200);
    expect(queue.body.items.map((b: { id: number }) => b.id)).not.toContain(units[0].id);
    const mine = await crew.juno.get(`/api/builds?q=${units[0].serial}`).expect(200);
    expect(mine.body.items.map((b: { id: number }) => b.id)).toContain(units[0].id);
    expect(mine.body.total).toBeGreaterThanOrEqual(1);
  });

  it('walks the whole path: kit, build with measured Vf, fail to rework, pass, order ready, ship with a packing slip, deliver', async () => {
    const { c, order, batchId, units } = await releasedOrderBatch(2);
    await crew.planner.post(`/api/batches/${batchId}/kit`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    const [u1, u2] = units;
    const step = c.steps[0];
    await crew.juno.post(`/api/units/${u1.id}/steps/${step}/start`).set('X-CSRF-Token', crew.juno.csrf).send({}).expect(200);
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('in_production');
    expect((await t.knex('batches').where({ id: batchId }).first()).state).toBe('on_bench');
    const twice = await crew.juno.post(`/api/units/${u1.id}/steps/${step}/start`).set('X-CSRF-Token', crew.juno.csrf).send({});
    expect(twice.status).toBe(409);
    const priyaTries = await crew.priya.post(`/api/units/${u1.id}/steps/${c.steps[1]}/start`).set('X-CSRF-Token', crew.priya.csrf).send({});
    expect(priyaTries.status).toBe(403);
    const early = await crew.juno.post(`/api/units/${u1.id}/built`).set('X-CSRF-Token', crew.juno.csrf).send({});
    expect(early.status).toBe(409);
    expect(early.body.error.message).toMatch(/steps not finished/);

    // A silicon diode reading 1.2 V is flagged before it is saved; the assembler may keep it knowingly.
    const detail = await crew.juno.get(`/api/units/${u1.id}`).expect(200);
    const silicon = detail.body.devices.find((d: { kind: string }) => d.kind === 'silicon');
    const bad = await crew.juno.put(`/api/units/${u1.id}/devices`).set('X-CSRF-Token', crew.juno.csrf).send({ readings: [{ optionDeviceId: silicon.optionDeviceId, vf: 1.2 }] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields['readings.0.vf']).toMatch(/outside 0\.50–0\.80 V for silicon/);
    const notNumber = await crew.juno.put(`/api/units/${u1.id}/devices`).set('X-CSRF-Token', crew.juno.csrf).send({ readings: [{ optionDeviceId: silicon.optionDeviceId, vf: 'abc' }] });
    expect(notNumber.status).toBe(400);

    await buildAsJuno(t.knex, crew.juno, u1.id, c);
    const built = await t.knex('units').where({ id: u1.id }).first();
    expect(built.state).toBe('built');
    // The silicon-vs-LED option is asymmetric: its predicted THD at the reference setting is well above zero.
    expect(built.predicted.thdPercent).toBeGreaterThan(1);
    expect(built.predicted.fromMeasuredVf).toBe(true);
    const progress = await t.knex('unit_steps').where({ unit_id: u1.id });
    expect(progress.every((p) => p.finished_at && p.actual_minutes !== null)).toBe(true);

    // Fail back to rework with a reason, then the assembler marks the rework done.
    const noReason = await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('measuredThdPercent', '5').field('outcome', 'fail');
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toBeTruthy();
    await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf)
      .field('currentDrawMa', '19').field('measuredThdPercent', '5').field('outcome', 'fail').field('reason', 'LED fitted backwards').expect(201);
    expect((await t.knex('units').where({ id: u1.id }).first()).state).toBe('rework');
    const retest = await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('measuredThdPercent', '5').field('outcome', 'pass');
    expect(retest.status).toBe(409);
    await crew.juno.post(`/api/units/${u1.id}/built`).set('X-CSRF-Token', crew.juno.csrf).send({}).expect(200);

    // Out of tolerance needs a reason to pass; within tolerance passes plainly.
    const predicted = built.predicted.thdPercent as number;
    const outOfTolerance = await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf)
      .field('currentDrawMa', '8.1').field('measuredThdPercent', String((predicted * 2).toFixed(2))).field('outcome', 'pass');
    expect(outOfTolerance.status).toBe(400);
    // Above the shop's highest current draw (settings), a pass needs a reason too; failing needs nothing more.
    const maxDraw = (await t.knex('settings').first('max_current_draw_ma')).max_current_draw_ma as number;
    const overDraw = await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf)
      .field('currentDrawMa', String(maxDraw + 5)).field('measuredThdPercent', String((predicted * 1.05).toFixed(2))).field('outcome', 'pass');
    expect(overDraw.status).toBe(400);
    expect(overDraw.body.error.fields.currentDrawMa).toContain(`${maxDraw} mA`);
    expect(overDraw.body.error.fields.reason).toMatch(/give a reason/);
    const pass = await crew.tester.post(`/api/units/${u1.id}/tests`).set('X-CSRF-Token', crew.tester.csrf)
      .field('currentDrawMa', '8.1').field('measuredThdPercent', String((predicted * 1.05).toFixed(2))).field('outcome', 'pass').expect(201);
    expect(pass.body.withinTolerance).toBe(true);
    expect(await t.knex('outbox').where({ dedupe_key: `unit-passed:${u1.id}` }).first()).toBeTruthy();

    // The order cannot ship while its second unit is unbuilt.
    // The demo settings' first carrier (seeds/01-shop-and-people.ts), with its tracking-URL template.
    const carrier = await t.knex('carriers').where({ active: true }).orderBy('position').first();
    const tooSoon = await crew.planner.post('/api/shipments').set('X-CSRF-Token', crew.planner.csrf).send({ orderId: order.orderId, carrierId: carrier.id, trackingNumber: 'PW123456789' });
    expect(tooSoon.status).toBe(409);
    await buildAsJuno(t.knex, crew.juno, u2.id, c);
    await crew.tester.post(`/api/units/${u2.id}/tests`).set('X-CSRF-Token', crew.tester.csrf)
      .field('currentDrawMa', '8').field('measuredThdPercent', '1').field('outcome', 'pass').field('reason', 'analyser range was wrong; listened and re-measured by hand').expect(201);
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('ready');

    const badShip = await crew.planner.post('/api/shipments').set('X-CSRF-Token', crew.planner.csrf).send({ orderId: order.orderId, carrierId: '', trackingNumber: '1' });
    expect(badShip.status).toBe(400);
    expect(Object.keys(badShip.body.error.fields).sort()).toEqual(['carrierId', 'trackingNumber']);
    // A carrier that is not in the settings' list is refused with a field message.
    const unknownCarrier = await crew.planner.post('/api/shipments').set('X-CSRF-Token', crew.planner.csrf).send({ orderId: order.orderId, carrierId: 2147483647, trackingNumber: 'PW123456789' });
    expect(unknownCarrier.status).toBe(400);
    expect(unknownCarrier.body.error.fields.carrierId).toMatch(/carriers in the settings/);
    const shipped = await crew.planner.post('/api/shipments').set('X-CSRF-Token', crew.planner.csrf).send({ orderId: order.orderId, carrierId: carrier.id, trackingNumber: 'PW123456789' }).expect(201);
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('shipped');
    expect((await t.knex('units').where({ batch_id: batchId })).every((u) => u.state === 'shipped')).toBe(true);
    expect((await t.knex('batches').where({ id: batchId }).first()).state).toBe('closed');
    const mail = await t.knex('outbox').where({ dedupe_key: `order-shipped:${order.orderId}` }).first();
    const link = carrier.tracking_url_template.replace('{tracking}', 'PW123456789');
    expect(mail.data).toMatchObject({ carrier: carrier.name, tracking: 'PW123456789', trackingUrl: link, orderNumber: order.number, customerName: 'Dee Castellano' });
    // The order page tells the customer the same carrier and link.
    const seen = await (await signedInAgent(t.app, DEMO.customer)).get(`/api/orders/${order.orderId}`).expect(200);
    expect(seen.body.shipments).toEqual([expect.objectContaining({ carrier: carrier.name, trackingNumber: 'PW123456789', trackingUrl: link })]);
    const pdf = await crew.planner.get(shipped.body.packingSlipUrl).buffer(true).parse((res, cb) => { const b: Buffer[] = []; res.on('data', (d: Buffer) => b.push(d)); res.on('end', () => cb(null, Buffer.concat(b))); }).expect(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
    const { PDFParse } = await import('pdf-parse');
    const text = (await new PDFParse({ data: pdf.body as Buffer }).getText()).text;
    expect(text).toContain(`order ${order.number}`);
    expect(text).toContain(u1.serial);
    expect(text).toContain('PW123456789');

    await crew.planner.post(`/api/shipments/${shipped.body.id}/delivered`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    expect((await t.knex('orders').where({ id: order.orderId }).first()).state).toBe('delivered');
    const again = await crew.planner.post(`/api/shipments/${shipped.body.id}/delivered`).set('X-CSRF-Token', crew.planner.csrf).send({});
    expect(again.status).toBe(409);
    const history = await t.knex('unit_events').where({ unit_id: u1.id, kind: 'state-change' }).orderBy('id');
    expect(history.map((h) => h.to_state)).toEqual(['waiting', 'building', 'built', 'rework', 'built', 'passed', 'shipped']);
  });

  it('puts a passed stock build into finished stock and fulfils a later order of the same option from it', async () => {
    const c = await makeCatalog(t.knex);
    const { body } = await crew.planner.post('/api/batches').set('X-CSRF-Token', crew.planner.csrf).send({ revisionId: c.revisionId, stockBuilds: [{ optionId: c.options.asym, quantity: 1 }] }).expect(201);
    await crew.planner.post(`/api/batches/${body.id}/release`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    await crew.planner.post(`/api/batches/${body.id}/kit`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    const [unit] = await t.knex('units').where({ batch_id: body.id });
    await crew.planner.post(`/api/batches/${body.id}/assignments`).set('X-CSRF-Token', crew.planner.csrf).send({ builds: [{ unitId: unit.id, assemblerId: await junoId(t.knex), date: '2027-01-05' }] }).expect(200);
    await buildAsJuno(t.knex, crew.juno, unit.id, c);
    await crew.tester.post(`/api/units/${unit.id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('measuredThdPercent', '1').field('outcome', 'pass').field('reason', 'stock unit, checked by ear').expect(201);
    await crew.planner.post(`/api/units/${unit.id}/finished-stock`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    const order = await makePaidOrder(t.knex, c.modelId, c.options.asym, 1);
    const bigger = await makePaidOrder(t.knex, c.modelId, c.options.asym, 2);
    const short = await crew.planner.post(`/api/order-lines/${bigger.lineId}/from-stock`).set('X-CSRF-Token', crew.planner.csrf).send({});
    expect(short.status).toBe(409);
    expect(short.body.error.message).toMatch(/holds 1 of the 2/);
    const queue = await crew.planner.get('/api/shipping').expect(200);
    const fillable = queue.body.fromStock.map((l: { orderLineId: number }) => l.orderLineId);
    expect(fillable).toContain(order.lineId);
    // The shelf holds one, so the line for two is not offered.
    expect(fillable).not.toContain(bigger.lineId);
    const done = await crew.planner.post(`/api/order-lines/${order.lineId}/from-stock`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    expect(done.body).toMatchObject({ orderState: 'ready', serials: [unit.serial] });
    const again = await crew.planner.post(`/api/order-lines/${order.lineId}/from-stock`).set('X-CSRF-Token', crew.planner.csrf).send({});
    expect(again.status).toBe(409);
    const carrier = await t.knex('carriers').where({ active: true }).orderBy('position').first();
    await crew.planner.post('/api/shipments').set('X-CSRF-Token', crew.planner.csrf).send({ orderId: order.orderId, carrierId: carrier.id, trackingNumber: 'PW-STOCK-1' }).expect(201);
    expect((await t.knex('units').where({ id: unit.id }).first()).state).toBe('shipped');
  });

  it('takes build photos from the unit’s own assembler only, images only, with a size limit', async () => {
    const { units } = await releasedOrderBatch(1);
    // The smallest valid PNG: 1×1 pixel (PNG specification, ISO/IEC 15948).
    const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==', 'base64');
    const ok = await crew.juno.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.juno.csrf).field('caption', 'board before boxing').attach('photo', png, { filename: 'board.png', contentType: 'image/png' }).expect(201);
    const photo = await crew.juno.get(`/api/units/${units[0].id}/photos/${ok.body.id}`).expect(200);
    expect(photo.headers['content-type']).toBe('image/png');
    const text = await crew.juno.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.juno.csrf).attach('photo', Buffer.from('not an image'), { filename: 'notes.txt', contentType: 'text/plain' });
    expect(text.status).toBe(400);
    expect(text.body.error.fields.photo).toMatch(/JPEG, PNG or WebP/);
    const disguised = await crew.juno.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.juno.csrf).attach('photo', Buffer.from('plain text dressed up'), { filename: 'x.png', contentType: 'image/png' });
    expect(disguised.status).toBe(400);
    const none = await crew.juno.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.juno.csrf).send({});
    expect(none.status).toBe(400);
    const big = await crew.juno.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.juno.csrf).attach('photo', Buffer.alloc(9 * 1024 * 1024, 7), { filename: 'huge.png', contentType: 'image/png' });
    expect(big.status).toBe(413);
    expect(big.body.error.message).toMatch(/photo is larger than 8 MB/);
    const other = await crew.priya.post(`/api/units/${units[0].id}/photos`).set('X-CSRF-Token', crew.priya.csrf).attach('photo', png, { filename: 'board.png', contentType: 'image/png' });
    expect(other.status).toBe(403);
    expect((await crew.juno.get(`/api/units/${units[0].id}`).expect(200)).body.photos).toHaveLength(1);
  });

  it('analyses an uploaded WAV capture and refuses bad uploads with clear messages', async () => {
    const { c, batchId, units } = await releasedOrderBatch(1);
    await crew.planner.post(`/api/batches/${batchId}/kit`).set('X-CSRF-Token', crew.planner.csrf).send({}).expect(200);
    await buildAsJuno(t.knex, crew.juno, units[0].id, c);
    const post = () => crew.tester.post(`/api/units/${units[0].id}/tests`).set('X-CSRF-Token', crew.tester.csrf).field('currentDrawMa', '8').field('outcome', 'pass').field('reason', 'bench check');
    const notWav = await post().attach('capture', Buffer.from('hello, not audio at all'), 'capture.wav');
    expect(notWav.status).toBe(400);
    expect(notWav.body.error.fields.capture).toMatch(/Not a WAV file/);
    const rate = await post().attach('capture', tone({ h2: 0.1, h3: 0.05 }, 22050), 'capture.wav');
    expect(rate.status).toBe(400);
    expect(rate.body.error.fields.capture).toMatch(/22050 Hz: use 44\.1, 48 or 96 kHz/);
    const short = await post().attach('capture', tone({ h2: 0.1, h3: 0.05 }, 48000, 0.05), 'capture.wav');
    expect(short.status).toBe(400);
    expect(short.body.error.fields.capture).toMatch(/0\.05 s/);
    const big = await post().attach('capture', Buffer.alloc(13 * 1024 * 1024, 1), 'capture.wav');
    expect(big.status).toBe(413);
    expect(big.body.error.message).toMatch(/larger than 12 MB/);
    expect((await t.knex('test_records').where({ unit_id: units[0].id })).length).toBe(0);

    const ok = await post().attach('capture', tone({ h2: 0.1, h3: 0.05 }, 44100, 1, 2), 'capture.wav').expect(201);
    // Known content: H2 = 10 %, H3 = 5 % of the fundamental, so THD_F = √(0.1² + 0.05²) = 11.18 %.
    expect(ok.body.capture.thdFPercent).toBeCloseTo(11.18, 1);
    expect(ok.body.measuredThdPercent).toBeCloseTo(11.18, 1);
    expect(ok.body.capture.fundamentalHz).toBeCloseTo(1000, 0);
    expect(ok.body.capture.channels).toBe(2);
    const record = await t.knex('test_records').where({ unit_id: units[0].id }).first();
    expect(record.wav_file_id).not.toBeNull();
  });
});
