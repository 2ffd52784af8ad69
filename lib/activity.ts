// The Dashboard's activity feed: what needs the signed-in person (versions awaiting their review, their
// versions sent back for revision, their versions whose source model has moved on) and what happened
// lately on the shelf (submissions, decisions, retirements, new source versions that left reduced models
// upstream-changed).
import { db } from '@/lib/db';
import type { Role } from '@/lib/roles';
import type { VersionStatus } from '@/lib/review/state-machine';
import { reviewQueue, type Actor, type QueueEntry } from '@/lib/reviews';
import { LIVE_STATUSES, upstreamChangedVersions, type UpstreamChange } from '@/lib/upstream';

export type ReviewActivityKind = 'submitted' | 'approved' | 'revise' | 'retired';

export type ActivityItem =
  | {
      kind: ReviewActivityKind;
      at: string;
      actorName: string;
      versionId: string;
      reducedModelName: string;
      number: number;
      body: string;
    }
  | {
      kind: 'source_version';
      at: string;
      actorName: string;
      sourceModelName: string;
      sourceModelSlug: string;
      number: number;
      /** Live reduced versions reduced from an older version of this source model. */
      upstreamChangedCount: number;
    };

export interface SentBack {
  versionId: string;
  reducedModelName: string;
  number: number;
  reviewerName: string;
  comment: string;
  at: string;
}

export interface DashboardActivity {
  /** Reviewers: versions in review that they did not author. */
  awaitingYourReview: QueueEntry[];
  /** Their own versions in review (waiting for someone else). */
  yoursInReview: QueueEntry[];
  sentBackToYou: SentBack[];
  yourUpstreamChanged: UpstreamChange[];
  recent: ActivityItem[];
}

export async function recentActivity(limit = 15): Promise<ActivityItem[]> {
  const knex = db();
  const reviewRows = await knex('reviews as rw')
    .join('reduced_versions as rv', 'rv.id', 'rw.reduced_version_id')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('users as u', 'u.id', 'rw.actor_id')
    .whereIn('rw.event', ['submitted', 'approved', 'revise', 'retired'])
    .orderBy('rw.id', 'desc')
    .limit(limit)
    .select('rw.event', 'rw.created_at', 'rw.body', 'rw.reduced_version_id', 'rv.number', 'rm.name as rm_name', 'u.name as actor_name');
  const sourceRows = await knex('source_versions as sv')
    .join('source_models as sm', 'sm.id', 'sv.source_model_id')
    .join('users as u', 'u.id', 'sv.uploaded_by')
    .where('sv.number', '>', 1)
    .orderBy('sv.created_at', 'desc')
    .limit(limit)
    .select(
      'sv.number',
      'sv.created_at',
      'sm.name as sm_name',
      'sm.slug as sm_slug',
      'u.name as actor_name',
      knex.raw(
        `(SELECT count(*) FROM reduced_versions rv JOIN source_versions old ON old.id = rv.source_version_id
           WHERE old.source_model_id = sv.source_model_id AND old.number < sv.number
             AND rv.status = ANY(?))::int AS affected`,
        [LIVE_STATUSES as string[]],
      ),
    );
  const items: ActivityItem[] = [
    ...reviewRows.map((r) => ({
      kind: r.event as ReviewActivityKind,
      at: (r.created_at as Date).toISOString(),
      actorName: r.actor_name,
      versionId: r.reduced_version_id,
      reducedModelName: r.rm_name,
      number: r.number,
      body: r.body,
    })),
    ...sourceRows.map((r) => ({
      kind: 'source_version' as const,
      at: (r.created_at as Date).toISOString(),
      actorName: r.actor_name,
      sourceModelName: r.sm_name,
      sourceModelSlug: r.sm_slug,
      number: r.number,
      upstreamChangedCount: r.affected,
    })),
  ];
  return items.sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0)).slice(0, limit);
}

async function sentBackTo(authorId: string): Promise<SentBack[]> {
  const rows = await db()('reduced_versions as rv')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('reviews as rw', (j) => j.on('rw.reduced_version_id', 'rv.id').andOnVal('rw.event', '=', 'revise'))
    .join('users as u', 'u.id', 'rw.actor_id')
    .where({ 'rv.author_id': authorId, 'rv.status': 'revise' satisfies VersionStatus })
    // Answered once a next draft exists.
    .whereNotExists(db()('reduced_versions as nxt').whereRaw('nxt.predecessor_id = rv.id').andWhereRaw('nxt.source_version_id = rv.source_version_id'))
    .orderBy('rw.id', 'desc')
    .select('rv.id', 'rv.number', 'rm.name as rm_name', 'u.name as reviewer_name', 'rw.body', 'rw.created_at');
  return rows.map((r) => ({
    versionId: r.id,
    reducedModelName: r.rm_name,
    number: r.number,
    reviewerName: r.reviewer_name,
    comment: r.body,
    at: (r.created_at as Date).toISOString(),
  }));
}

const AUTHOR_ROLES: readonly Role[] = ['engineer', 'reviewer', 'admin'];

export async function dashboardActivity(viewer: Actor): Promise<DashboardActivity> {
  const queue = await reviewQueue(viewer);
  const authors = AUTHOR_ROLES.includes(viewer.role);
  const [sentBackToYou, yourUpstreamChanged, recent] = await Promise.all([
    authors ? sentBackTo(viewer.id) : Promise.resolve([]),
    authors ? upstreamChangedVersions({ authorId: viewer.id, limit: 20 }) : Promise.resolve([]),
    recentActivity(),
  ]);
  return {
    awaitingYourReview: queue.filter((q) => q.yoursToDecide),
    yoursInReview: queue.filter((q) => q.authorId === viewer.id),
    sentBackToYou,
    yourUpstreamChanged,
    recent,
  };
}
