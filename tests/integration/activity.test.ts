// The Dashboard's activity feed reads the audit log (lib/activity.ts): every recorded action appears in
// words with a link to its subject, the seed's as well as every person's; events about people (invitations,
// roles, resets) only for admins; an action the feed has no words for is still listed, by its name.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { recentActivity } from '@/lib/activity';
import type { UserRow } from '@/lib/people';
import { makeUser, migrateTestDatabase } from './helpers';
import { addSourceVersion, makeShelf } from './fixtures/shelf';

let engineer: UserRow;

beforeAll(async () => {
  await migrateTestDatabase();
  engineer = await makeUser({ role: 'engineer', label: 'feed-reader' });
});

afterAll(async () => {
  await closeDb();
});

describe('the activity feed', () => {
  it('lists uploads, registrations and unknown actions in words, and people events for admins only', async () => {
    const shelf = await makeShelf(engineer.id);
    const v2 = await addSourceVersion(shelf.sourceModel.id, engineer.id);
    await recordAudit(db(), { actorId: engineer.id, action: 'reduced_version.registered', subjectType: 'reduced_version', subjectId: shelf.version.id, details: { number: 1 } });
    await recordAudit(db(), { actorId: engineer.id, action: 'user.role_changed', subjectType: 'user', subjectId: engineer.id, details: { from: 'viewer', to: 'engineer' } });
    await recordAudit(db(), { actorId: null, action: 'shelf.tidied', subjectType: 'source_version', subjectId: v2.id, details: {} });

    // Other files add events at the same time, so the feed is read deeper than the Dashboard's fifteen.
    const feed = await recentActivity(500);
    const mine = (action: string, id: string) => feed.find((i) => i.action === action && i.subjectId === id);
    expect(mine('source_model.created', shelf.sourceVersion.id)).toMatchObject({
      actorName: engineer.name,
      verb: 'uploaded a new source model,',
      subject: { label: `${shelf.sourceModel.name} v1`, href: `/source-models/${shelf.sourceModel.slug}/versions/1` },
      tone: 'source',
    });
    expect(mine('source_version.uploaded', v2.id)).toMatchObject({ verb: 'uploaded', subject: { label: `${shelf.sourceModel.name} v2` }, upstreamChangedCount: 1 });
    expect(mine('source_version.uploaded', v2.id)?.detail).toBe('1 reduced model version now upstream changed');
    expect(mine('reduced_version.registered', shelf.version.id)).toMatchObject({ verb: 'registered', subject: { href: `/reviews/${shelf.version.id}` } });
    expect(mine('shelf.tidied', v2.id)).toMatchObject({ actorName: 'Someone', verb: 'recorded shelf.tidied on' });
    // Newest first.
    const at = feed.map((i) => Number(i.id));
    expect([...at].sort((a, b) => b - a)).toEqual(at);

    expect(feed.some((i) => i.subjectType === 'user')).toBe(false);
    const forAdmin = await recentActivity(500, { withPeople: true });
    expect(forAdmin.find((i) => i.action === 'user.role_changed' && i.subjectId === engineer.id)).toMatchObject({
      tone: 'people',
      verb: `changed the role of ${engineer.name} to engineer`,
    });
  });
});
