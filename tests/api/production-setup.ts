// The app and the shop's production people for a production test file: the app on the test
// database, the people the file acts as signed in once before its tests, the app stopped after.
import type { Knex } from 'knex';
import { afterAll, beforeAll } from 'vitest';
import { DEMO, signedInAgent, startTestApp, type TestAgent } from '../support/app';
import type { makeCatalog } from './production-fixture';

/** Who a production test can act as: the demo accounts (seeds/01-shop-and-people.ts). */
export const CREW = {
  planner: DEMO.planner,
  owner: DEMO.owner,
  /** Juno, the demo assembler the tests assign builds to. */
  juno: DEMO.assembler,
  /** Priya, a second assembler: someone else's builds are closed to her. */
  priya: 'priya@shop.example',
  tester: DEMO.tester,
  customer: DEMO.customer,
} as const;

export type CrewMember = keyof typeof CREW;

export interface ProductionApp<M extends CrewMember> {
  t: ReturnType<typeof startTestApp>;
  /** The named people, signed in (filled before the first test). */
  crew: Record<M, TestAgent>;
}

/** Starts the app for this file and signs in the named people before its tests. */
export function useProductionApp<M extends CrewMember>(members: readonly M[]): ProductionApp<M> {
  const t = startTestApp();
  afterAll(() => t.stop());
  const crew = {} as Record<M, TestAgent>;
  beforeAll(async () => {
    for (const member of members) crew[member] = await signedInAgent(t.app, CREW[member]);
  });
  return { t, crew };
}

/** Every build skill, as the assembler's screen lists them. */
export const EVERY_SKILL = ['through-hole', 'device-matching', 'enclosure', 'smd-rework', 'final-check'];

/** Juno's user id. */
export async function junoId(knex: Knex): Promise<number> {
  return (await knex('users').where({ email: CREW.juno }).first()).id;
}

/** Gives Juno every skill and a full day's capacity through the planner's API; answers her id. */
export async function readyJuno(knex: Knex, planner: TestAgent): Promise<number> {
  const id = await junoId(knex);
  await planner.put(`/api/assemblers/${id}`).set('X-CSRF-Token', planner.csrf).send({ skills: EVERY_SKILL, dailyCapacityMinutes: 420 }).expect(200);
  return id;
}

/**
 * Juno builds a kitted unit assigned to her through to `built`: every step (started unless it
 * already is, finished with the fast-step confirmation), Vf readings 4 mV above each device's
 * nominal, and the PCB's lot.
 */
export async function buildAsJuno(knex: Knex, juno: TestAgent, unitId: number, c: Awaited<ReturnType<typeof makeCatalog>>) {
  for (const step of c.steps) {
    const started = await knex('unit_steps').where({ unit_id: unitId, step_id: step }).first();
    if (!started) await juno.post(`/api/units/${unitId}/steps/${step}/start`).set('X-CSRF-Token', juno.csrf).send({}).expect(200);
    await juno.post(`/api/units/${unitId}/steps/${step}/finish`).set('X-CSRF-Token', juno.csrf).send({ confirmFast: true }).expect(200);
  }
  const detail = await juno.get(`/api/units/${unitId}`).expect(200);
  const readings = detail.body.devices.map((d: { optionDeviceId: number; nominalVf: number }) => ({ optionDeviceId: d.optionDeviceId, vf: Number((d.nominalVf + 0.004).toFixed(3)) }));
  await juno.put(`/api/units/${unitId}/devices`).set('X-CSRF-Token', juno.csrf).send({ readings }).expect(200);
  await juno.put(`/api/units/${unitId}/lots`).set('X-CSRF-Token', juno.csrf).send({ lots: [{ bomLineId: c.pcbLine, lot: 'PCB-LOT-9' }] }).expect(200);
  await juno.post(`/api/units/${unitId}/built`).set('X-CSRF-Token', juno.csrf).send({}).expect(200);
}
