import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ORDER_STATES, ORDER_TRANSITIONS, type OrderState } from '../../shared/order-states';
import { DomainError } from '../../server/errors';
import { transitionOrder } from '../../server/services/orders/transitions';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import { insertPedal, placeOrder, type PedalFixture } from './orders-fixtures';

const t = startTestApp();
let pedal: PedalFixture;
let customer: TestAgent;
let planner: TestAgent;

beforeAll(async () => {
  pedal = await insertPedal(t.knex);
  customer = await signedInAgent(t.app, DEMO.customer);
  planner = await signedInAgent(t.app, DEMO.planner);
});
afterAll(() => t.stop());

describe('the order state machine', () => {
  it('allows exactly the listed changes from every state, and a refused one changes nothing', async () => {
    const { order } = await placeOrder(customer, pedal);
    const outcomes: string[] = [];
    for (const from of ORDER_STATES) {
      for (const to of ORDER_STATES) {
        await t.knex('orders').where({ id: order.id }).update({ state: from });
        const result = await t.knex.transaction((trx) => transitionOrder(trx, order.id, to, { message: 'matrix' })).then(
          (row) => `ok:${row.state}`,
          (e: unknown) => (e instanceof DomainError ? `${e.status}` : String(e)),
        );
        const legal = (ORDER_TRANSITIONS[from] as readonly OrderState[]).includes(to);
        if (result !== (legal ? `ok:${to}` : '409')) outcomes.push(`${from} → ${to}: ${result}`);
        const now = (await t.knex('orders').where({ id: order.id }).first()).state;
        if (now !== (legal ? to : from)) outcomes.push(`${from} → ${to}: left in ${now}`);
      }
    }
    expect(outcomes).toEqual([]);
    // Only the legal changes were written into the history.
    const legalCount = ORDER_STATES.reduce((n, s) => n + ORDER_TRANSITIONS[s].length, 0);
    expect(await t.knex('order_events').where({ order_id: order.id, message: 'matrix' })).toHaveLength(legalCount);
  });

  it('answers 404 for an order that does not exist', async () => {
    const result = await t.knex.transaction((trx) => transitionOrder(trx, 99_999_999, 'paid')).catch((e: DomainError) => e.status);
    expect(result).toBe(404);
  });

  it('lets staff mark a shipped order delivered, and refuses it with 409 from any other state', async () => {
    const { order } = await placeOrder(customer, pedal);
    const early = await planner.post(`/api/orders/${order.id}/delivered`).set('X-CSRF-Token', planner.csrf).send({}).expect(409);
    expect(early.body.error.message).toMatch(/awaiting payment/);
    await t.knex('orders').where({ id: order.id }).update({ state: 'shipped' });
    const done = await planner.post(`/api/orders/${order.id}/delivered`).set('X-CSRF-Token', planner.csrf).send({ message: 'Signed for by neighbour' }).expect(200);
    expect(done.body.order.state).toBe('delivered');
    expect(done.body.events.at(-1)).toMatchObject({ kind: 'state-change', from_state: 'shipped', to_state: 'delivered', message: 'Signed for by neighbour', user_name: 'Ravi Lindqvist' });
    await planner.post(`/api/orders/${order.id}/delivered`).set('X-CSRF-Token', planner.csrf).send({}).expect(409);
  });
});
