// audit_events is append-only by the database's own rules (trigger in its migration), not by convention.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, closeDb } from '@/lib/db';
import { recordAudit, auditTrail } from '@/lib/audit';
import { makeUser, migrateTestDatabase } from './helpers';

beforeAll(migrateTestDatabase);
afterAll(closeDb);

describe('audit_events', () => {
  it('records who did what to which subject, with details', async () => {
    const actor = await makeUser({ role: 'engineer', label: 'auditor' });
    await recordAudit(db(), {
      actorId: actor.id,
      action: 'user.role_changed',
      subjectType: 'user',
      subjectId: actor.id,
      details: { from: 'viewer', to: 'admin' },
    });
    const [event] = await auditTrail('user', actor.id);
    expect(event.action).toBe('user.role_changed');
    expect(event.actorId).toBe(actor.id);
    expect(event.details).toEqual({ from: 'viewer', to: 'admin' });
    expect(event.at).toBeInstanceOf(Date);
  });

  it('refuses UPDATE, DELETE and TRUNCATE, even from the owner of the table', async () => {
    const actor = await makeUser({ role: 'engineer', label: 'auditor' });
    await recordAudit(db(), { actorId: actor.id, action: 'test.appended', subjectType: 'user', subjectId: actor.id });
    const [event] = await auditTrail('user', actor.id);
    await expect(db()('audit_events').where({ id: event.id }).update({ action: 'test.rewritten' })).rejects.toThrow(
      /append-only: UPDATE refused/,
    );
    await expect(db()('audit_events').where({ id: event.id }).delete()).rejects.toThrow(/append-only: DELETE refused/);
    await expect(db().raw('TRUNCATE audit_events')).rejects.toThrow(/append-only: TRUNCATE refused/);
    const [still] = await auditTrail('user', actor.id);
    expect(still.action).toBe('test.appended');
  });

  it('keeps the person an event refers to: deleting them is refused', async () => {
    const actor = await makeUser({ role: 'engineer', label: 'kept' });
    await recordAudit(db(), { actorId: actor.id, action: 'test.appended', subjectType: 'user', subjectId: actor.id });
    await expect(db()('users').where({ id: actor.id }).delete()).rejects.toThrow(/foreign key/);
  });
});
