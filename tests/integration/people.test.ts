// Admin actions on people, against the real database. This is the only integration file that creates
// admins: the last-admin rule counts every active admin in the database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { updatePerson, listPeople, inviteSchema } from '@/lib/people';
import { auditTrail } from '@/lib/audit';
import { ApiError } from '@/lib/http';
import { makeUser, migrateTestDatabase } from './helpers';

beforeAll(migrateTestDatabase);
afterAll(closeDb);

class Rollback extends Error {}

describe('people', () => {
  it('changes a role and records the change in the audit trail', async () => {
    const admin = await makeUser({ role: 'admin' });
    const person = await makeUser({ role: 'viewer' });
    const updated = await updatePerson(person.id, { role: 'engineer' }, admin.id);
    expect(updated.role).toBe('engineer');
    const [event] = await auditTrail('user', person.id);
    expect(event).toMatchObject({ action: 'user.role_changed', actorId: admin.id, details: { from: 'viewer', to: 'engineer' } });
  });

  it('deactivates and reactivates, recording each', async () => {
    const admin = await makeUser({ role: 'admin' });
    const person = await makeUser({ role: 'reviewer' });
    expect((await updatePerson(person.id, { active: false }, admin.id)).active).toBe(false);
    expect((await updatePerson(person.id, { active: true }, admin.id)).active).toBe(true);
    const actions = (await auditTrail('user', person.id)).map((e) => e.action);
    expect(actions).toEqual(['user.reactivated', 'user.deactivated']);
  });

  it('refuses to demote or deactivate the only active admin', async () => {
    await db()
      .transaction(async (trx) => {
        await trx('users').where({ role: 'admin', active: true }).update({ active: false });
        const [only] = await trx('users')
          .insert({ email: 'only-admin@test.quillmere.example', name: 'Only Admin', role: 'admin', active: true })
          .returning('*');
        const demote = updatePerson(only.id, { role: 'engineer' }, only.id, trx);
        await expect(demote).rejects.toBeInstanceOf(ApiError);
        await expect(demote).rejects.toMatchObject({ status: 409, code: 'last_admin', field: 'role' });
        await expect(updatePerson(only.id, { active: false }, only.id, trx)).rejects.toMatchObject({
          code: 'last_admin',
          field: 'active',
        });
        throw new Rollback();
      })
      .catch((err) => {
        if (!(err instanceof Rollback)) throw err;
      });
  });

  it('lists people without their password hashes', async () => {
    const person = await makeUser({ role: 'engineer' });
    const listed = (await listPeople()).find((p) => p.id === person.id);
    expect(listed).toMatchObject({ email: person.email, role: 'engineer', active: true, hasPassword: true });
    expect(JSON.stringify(listed)).not.toContain('$2');
  });

  it('rejects an invitation with a role that does not exist, naming the field', () => {
    const parsed = inviteSchema.safeParse({ email: 'a@b.example', name: 'A', role: 'superuser' });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0].path).toEqual(['role']);
  });

  it('lets the database refuse an unknown role too', async () => {
    await expect(
      db()('users').insert({ email: 'bad-role@test.quillmere.example', name: 'Bad', role: 'superuser' }),
    ).rejects.toThrow(/users_role_check/);
  });
});
