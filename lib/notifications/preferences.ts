// Who wants which notification mail: the kinds of mail, the per-person preferences (notification_preferences;
// a person who never changed them gets every kind) and the recipients of one mail, read inside the
// transaction of the change it tells about.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import type { Role } from '@/lib/roles';

export const NOTIFICATION_KINDS = ['review_requested', 'review_decided', 'upstream_changed'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

export interface NotificationPreferences {
  /** Reviewers: a version was submitted for review. */
  reviewRequested: boolean;
  /** Authors: their version was approved or sent back for revision. */
  reviewDecided: boolean;
  /** Authors: the source model of their reduced model has a new version. */
  upstreamChanged: boolean;
}

export const DEFAULT_PREFERENCES: NotificationPreferences = { reviewRequested: true, reviewDecided: true, upstreamChanged: true };

const COLUMN: Record<NotificationKind, 'review_requested' | 'review_decided' | 'upstream_changed'> = {
  review_requested: 'review_requested',
  review_decided: 'review_decided',
  upstream_changed: 'upstream_changed',
};

/** Which roles each mail is for; the profile page offers only these. */
export const KIND_ROLES: Record<NotificationKind, readonly Role[]> = {
  review_requested: ['reviewer'],
  review_decided: ['engineer', 'reviewer', 'admin'],
  upstream_changed: ['engineer', 'reviewer', 'admin'],
};

const flag = (name: string) => z.boolean({ error: `${name} must be true or false.` });
export const preferencesUpdateSchema = z
  .object({
    reviewRequested: flag('reviewRequested'),
    reviewDecided: flag('reviewDecided'),
    upstreamChanged: flag('upstreamChanged'),
  })
  .partial()
  .strict()
  .refine((p) => Object.keys(p).length > 0, { message: 'Give at least one setting to change.' });
export type PreferencesUpdate = z.infer<typeof preferencesUpdateSchema>;

interface PreferenceRow {
  user_id: string;
  review_requested: boolean;
  review_decided: boolean;
  upstream_changed: boolean;
}

function toPreferences(row: PreferenceRow | undefined): NotificationPreferences {
  if (!row) return { ...DEFAULT_PREFERENCES };
  return { reviewRequested: row.review_requested, reviewDecided: row.review_decided, upstreamChanged: row.upstream_changed };
}

export async function getPreferences(userId: string, trx: Knex | Knex.Transaction = db()): Promise<NotificationPreferences> {
  return toPreferences(await trx<PreferenceRow>('notification_preferences').where({ user_id: userId }).first());
}

export async function updatePreferences(userId: string, change: PreferencesUpdate): Promise<NotificationPreferences> {
  return db().transaction(async (trx) => {
    const before = await getPreferences(userId, trx);
    const after = { ...before, ...change };
    await trx('notification_preferences')
      .insert({
        user_id: userId,
        review_requested: after.reviewRequested,
        review_decided: after.reviewDecided,
        upstream_changed: after.upstreamChanged,
        updated_at: trx.fn.now(),
      })
      .onConflict('user_id')
      .merge();
    await recordAudit(trx, {
      actorId: userId,
      action: 'user.notifications_changed',
      subjectType: 'user',
      subjectId: userId,
      details: { from: before, to: after },
    });
    return after;
  });
}

export interface Recipient {
  id: string;
  email: string;
  name: string;
}

/**
 * Active people who want this kind of mail, optionally only among `userIds` and only with `roles`.
 * Read inside the caller's transaction, so the recipients are those at the moment of the change.
 */
export async function recipientsFor(
  trx: Knex | Knex.Transaction,
  kind: NotificationKind,
  filter: { userIds?: readonly string[]; roles?: readonly Role[]; exclude?: readonly string[] },
): Promise<Recipient[]> {
  const query = trx('users as u')
    .leftJoin('notification_preferences as p', 'p.user_id', 'u.id')
    .where('u.active', true)
    .whereNotNull('u.password_hash') // an open invitation is not someone to notify yet
    .andWhere((q) => q.whereNull('p.user_id').orWhere(`p.${COLUMN[kind]}`, true))
    .select('u.id', 'u.email', 'u.name')
    .orderBy('u.name');
  if (filter.userIds) query.whereIn('u.id', filter.userIds as string[]);
  if (filter.roles) query.whereIn('u.role', filter.roles as string[]);
  if (filter.exclude && filter.exclude.length > 0) query.whereNotIn('u.id', filter.exclude as string[]);
  return query;
}
