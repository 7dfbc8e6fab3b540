import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLE_CHANGE_UNDO_SECONDS } from '../../shared/schemas/auth';
import { COUNT_CAP } from '../../shared/schemas/list';
import { DEMO, signedInAgent, startTestApp, uniqueEmail, type TestAgent } from '../support/app';

// People & roles: staff and customers are listed apart (searchable, paged); a role change names
// the role it was confirmed from and can be undone for a minute, by the database's clock.
const t = startTestApp();
let owner: TestAgent;
afterAll(() => t.stop());
beforeAll(async () => {
  owner = await signedInAgent(t.app, DEMO.owner);
});

const password = 'first-password-1';
async function addPerson(role: string, label = 'Pat Quillfeather') {
  const email = uniqueEmail(role);
  const res = await owner.post('/api/users').set('X-CSRF-Token', owner.csrf).send({ name: label, email, role, password }).expect(201);
  return { id: res.body.user.id as number, email };
}
const patch = (id: number, body: object) => owner.patch(`/api/users/${id}`).set('X-CSRF-Token', owner.csrf).send(body);
const undo = (changeId: number | string) => owner.post(`/api/role-changes/${changeId}/undo`).set('X-CSRF-Token', owner.csrf);
const roleOf = async (id: number) => (await t.knex('users').where({ id }).first('role')).role as string;

describe('people lists', () => {
  it('lists staff and customers apart, and together they are everyone', async () => {
    await addPerson('customer', 'Corvina Ashdown');
    await addPerson('tester', 'Corvina Staffwell');
    const staff = await owner.get('/api/users?staff=true&pageSize=100').expect(200);
    const customers = await owner.get('/api/users?staff=false&pageSize=100').expect(200);
    expect(staff.body.items.length).toBeGreaterThan(0);
    expect(staff.body.items.every((u: { role: string }) => u.role !== 'customer')).toBe(true);
    expect(customers.body.items.every((u: { role: string }) => u.role === 'customer')).toBe(true);
    const all = Number((await t.knex('users').count('* as n').first())!.n);
    // Counts stop at COUNT_CAP (a long test run can make more accounts than that).
    expect(Math.min(staff.body.total + customers.body.total, COUNT_CAP)).toBe(Math.min(all, COUNT_CAP));
  });

  it('searches within one list by name or e-mail', async () => {
    const found = await owner.get('/api/users?staff=false&q=corvina').expect(200);
    expect(found.body.items.map((u: { name: string }) => u.name)).toContain('Corvina Ashdown');
    expect(found.body.items.map((u: { name: string }) => u.name)).not.toContain('Corvina Staffwell');
    const none = await owner.get('/api/users?staff=true&q=no-such-person-anywhere').expect(200);
    expect(none.body).toMatchObject({ items: [], total: 0 });
  });

  it('pages a list without overlap', async () => {
    const first = await owner.get('/api/users?staff=true&pageSize=2&page=1&sort=email').expect(200);
    const second = await owner.get('/api/users?staff=true&pageSize=2&page=2&sort=email').expect(200);
    expect(first.body.items).toHaveLength(2);
    const firstIds = first.body.items.map((u: { id: number }) => u.id);
    expect(second.body.items.some((u: { id: number }) => firstIds.includes(u.id))).toBe(false);
    expect(first.body.items[1].email < second.body.items[0].email).toBe(true);
  });
});

describe('role changes', () => {
  it('changes a role confirmed from the current one, and the person has it at once', async () => {
    const person = await addPerson('assembler');
    const worker = await signedInAgent(t.app, person.email, password);
    const res = await patch(person.id, { role: 'planner', fromRole: 'assembler' }).expect(200);
    expect(res.body.user.role).toBe('planner');
    expect(res.body.roleChange).toMatchObject({ from: 'assembler', to: 'planner', undoSeconds: ROLE_CHANGE_UNDO_SECONDS });
    expect((await worker.get('/api/auth/me')).body.user.role).toBe('planner');
    const row = await t.knex('role_changes').where({ id: res.body.roleChange.id }).first();
    expect(row).toMatchObject({ user_id: person.id, from_role: 'assembler', to_role: 'planner', undone_at: null });
  });

  it('refuses a change confirmed from a role the person no longer has (409), and changes nothing', async () => {
    const person = await addPerson('tester');
    const res = await patch(person.id, { role: 'owner', fromRole: 'assembler' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/is tester now, not assembler/);
    expect(await roleOf(person.id)).toBe('tester');
    expect(await t.knex('role_changes').where({ user_id: person.id }).first()).toBeUndefined();
  });

  it('refuses fromRole without a new role (400)', async () => {
    const person = await addPerson('tester');
    expect((await patch(person.id, { fromRole: 'tester' })).status).toBe(400);
  });

  it('undoes a change within the minute, once', async () => {
    const person = await addPerson('assembler');
    const worker = await signedInAgent(t.app, person.email, password);
    const changed = await patch(person.id, { role: 'owner', fromRole: 'assembler' }).expect(200);
    const undone = await undo(changed.body.roleChange.id).expect(200);
    expect(undone.body.user.role).toBe('assembler');
    expect((await worker.get('/api/auth/me')).body.user.role).toBe('assembler');
    expect((await t.knex('role_changes').where({ id: changed.body.roleChange.id }).first()).undone_at).not.toBeNull();
    const again = await undo(changed.body.roleChange.id);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already undone/);
  });

  it('refuses to undo after the minute (409)', async () => {
    const person = await addPerson('assembler');
    const changed = await patch(person.id, { role: 'tester', fromRole: 'assembler' }).expect(200);
    // The change was made a minute and a second ago.
    await t.knex('role_changes').where({ id: changed.body.roleChange.id })
      .update({ changed_at: t.knex.raw(`now() - make_interval(secs => ?)`, [ROLE_CHANGE_UNDO_SECONDS + 1]) });
    const res = await undo(changed.body.roleChange.id);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/minute to undo it has passed/);
    expect(await roleOf(person.id)).toBe('tester');
  });

  it('refuses to undo a change that a later change replaced (409)', async () => {
    const person = await addPerson('assembler');
    const first = await patch(person.id, { role: 'tester', fromRole: 'assembler' }).expect(200);
    await patch(person.id, { role: 'planner', fromRole: 'tester' }).expect(200);
    const res = await undo(first.body.roleChange.id);
    expect(res.status).toBe(409);
    expect(await roleOf(person.id)).toBe('planner');
  });

  it('answers 404 for a change that does not exist, and keeps non-owners out (403)', async () => {
    expect((await undo(2147483647)).status).toBe(404);
    expect((await undo('12abc')).status).toBe(404);
    const person = await addPerson('assembler');
    const changed = await patch(person.id, { role: 'tester', fromRole: 'assembler' }).expect(200);
    const planner = await signedInAgent(t.app, DEMO.planner);
    expect((await planner.post(`/api/role-changes/${changed.body.roleChange.id}/undo`).set('X-CSRF-Token', planner.csrf)).status).toBe(403);
    expect(await roleOf(person.id)).toBe('tester');
  });

  it('refuses to change the owner’s own role (409)', async () => {
    const me = (await owner.get('/api/auth/me')).body.user;
    expect((await patch(me.id, { role: 'planner', fromRole: 'owner' })).status).toBe(409);
  });
});
