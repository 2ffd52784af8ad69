// The Dashboard's activity feed: what needs the signed-in person (versions awaiting their review, their
// versions sent back for revision, their versions whose source model has moved on) and what happened
// lately on the shelf: every event of the audit log (lib/audit.ts), the demo seed's included, in words.
import { db } from '@/lib/db';
import type { Role } from '@/lib/roles';
import type { VersionStatus } from '@/lib/review/state-machine';
import { reviewQueue, type Actor, type QueueEntry } from '@/lib/review';
import { LIVE_STATUSES, upstreamChangedVersions, type UpstreamChange } from '@/lib/upstream';
import { versionPath } from '@/lib/source-models';
import { methodName } from '@/lib/recipe-words';
import { versionLineage } from '@/lib/version-lineage';

/** How an event is marked in the feed: the state it leaves a version in, or what kind of thing it concerns. */
export type ActivityTone = 'source' | 'draft' | 'in_review' | 'approved' | 'revise' | 'retired' | 'project' | 'people' | 'job';

/**
 * One event of the audit log in words: "{actorName} {verb} {subject}{suffix}", with the review text or the
 * upstream-changed count below it. Every action recorded through lib/audit.ts appears, the seed's included.
 */
export interface ActivityItem {
  id: string;
  at: string;
  /** audit_events.action as recorded */
  action: string;
  tone: ActivityTone;
  actorName: string;
  verb: string;
  /** what the event is about, linked where it has a page */
  subject: { label: string; href: string | null } | null;
  suffix: string;
  /** the review comment, note or reason, or what the event left behind (upstream changed) */
  detail: string | null;
  subjectType: string;
  subjectId: string | null;
  /** a source version's: live reduced versions made from an older version of its source model */
  upstreamChangedCount?: number;
}

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

interface AuditRow {
  id: string;
  at: Date;
  action: string;
  subject_type: string;
  subject_id: string | null;
  details: Record<string, unknown> | null;
  actor_name: string | null;
}

const str = (v: unknown): string | null => (typeof v === 'string' && v.trim() !== '' ? v : null);

/** Names and links of the events' subjects, looked up in one query per kind of subject. */
async function subjectsOf(rows: readonly AuditRow[]) {
  const knex = db();
  const ids = (type: string) => [...new Set(rows.filter((r) => r.subject_type === type && r.subject_id).map((r) => r.subject_id!))];
  const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
  const only = (list: string[]) => list.filter((id) => uuid.test(id));
  const [sources, reduced, projects, people, jobs] = await Promise.all([
    knex('source_versions as sv')
      .join('source_models as sm', 'sm.id', 'sv.source_model_id')
      .whereIn('sv.id', only(ids('source_version')))
      .select(
        'sv.id',
        'sv.number',
        'sm.name',
        'sm.slug',
        knex.raw(
          `(SELECT count(*) FROM reduced_versions rv JOIN source_versions old ON old.id = rv.source_version_id
             WHERE old.source_model_id = sv.source_model_id AND old.number < sv.number AND rv.status = ANY(?))::int AS affected`,
          [LIVE_STATUSES as string[]],
        ),
      ),
    versionLineage(knex).whereIn('rv.id', only(ids('reduced_version'))),
    knex('controller_projects').whereIn('id', only(ids('controller_project'))).select('id', 'name', 'slug'),
    knex('users').whereIn('id', only(ids('user'))).select('id', 'name'),
    knex('jobs').whereIn('id', only(ids('job'))).select('id', 'kind'),
  ]);
  return {
    source: new Map(sources.map((r: Record<string, unknown>) => [r.id as string, r])),
    reduced: new Map(reduced.map((r) => [r.versionId, { number: r.versionNumber, name: r.reducedModelName }])),
    project: new Map(projects.map((r: Record<string, unknown>) => [r.id as string, r])),
    person: new Map(people.map((r: Record<string, unknown>) => [r.id as string, r])),
    job: new Map(jobs.map((r: Record<string, unknown>) => [r.id as string, r])),
  };
}

const REVIEW_STEPS: Record<string, { verb: string; tone: ActivityTone; text: string }> = {
  'reduced_version.submitted': { verb: 'submitted for review', tone: 'in_review', text: 'note' },
  'reduced_version.approved': { verb: 'approved', tone: 'approved', text: 'comment' },
  'reduced_version.sent_back_for_revision': { verb: 'sent back for revision', tone: 'revise', text: 'comment' },
  'reduced_version.retired': { verb: 'retired', tone: 'retired', text: 'reason' },
};

/** The event in words (see ActivityItem); an action this build does not know is still listed, by its name. */
function describe(row: AuditRow, subjects: Awaited<ReturnType<typeof subjectsOf>>): ActivityItem {
  const d = row.details ?? {};
  const id = row.subject_id ?? '';
  const base = {
    id: String(row.id),
    at: row.at.toISOString(),
    action: row.action,
    subjectType: row.subject_type,
    subjectId: row.subject_id,
  };
  let actorName = row.actor_name ?? 'Someone';
  let verb = `recorded ${row.action} on`;
  let tone: ActivityTone = 'job';
  let suffix = '';
  let detail: string | null = null;
  let subject: ActivityItem['subject'] = null;
  let upstreamChangedCount: number | undefined;

  if (row.subject_type === 'source_version') {
    const sv = subjects.source.get(id) as { number: number; name: string; slug: string; affected: number } | undefined;
    subject = sv ? { label: `${sv.name} v${sv.number}`, href: versionPath(sv.slug, sv.number) } : { label: `${str(d.sourceModel) ?? 'a source model'} v${d.number ?? '?'}`, href: null };
    tone = 'source';
    if (row.action === 'source_model.created') verb = 'uploaded a new source model,';
    else if (row.action === 'source_version.uploaded') {
      verb = 'uploaded';
      upstreamChangedCount = sv?.affected ?? 0;
      if (upstreamChangedCount > 0) {
        detail = `${upstreamChangedCount} reduced model version${upstreamChangedCount === 1 ? '' : 's'} now upstream changed`;
      }
    } else if (row.action === 'reduction.requested') {
      verb = 'asked for a reduction of';
      tone = 'draft';
      const method = str(d.method);
      suffix = method ? ` by ${methodName(method)}` : '';
    }
  } else if (row.subject_type === 'reduced_version') {
    const rv = subjects.reduced.get(id);
    subject = { label: rv ? `${rv.name} v${rv.number}` : `a reduced model version${typeof d.number === 'number' ? ` v${d.number}` : ''}`, href: rv ? `/reviews/${id}` : null };
    const step = REVIEW_STEPS[row.action];
    tone = 'draft';
    if (step) {
      verb = step.verb;
      tone = step.tone;
      detail = str(d[step.text]);
    } else if (row.action === 'reduced_version.registered') verb = 'registered';
    else if (row.action === 'reduced_version.commented') verb = 'commented on';
    else if (row.action === 'reduced_version.next_draft_started') verb = 'started a new draft,';
    else if (row.action === 'reduced_version.rerun_requested') {
      verb = 'asked for a re-run of';
      suffix = typeof d.sourceNumber === 'number' ? ` on source v${d.sourceNumber}` : '';
    } else if (row.action === 'input_response.requested') {
      verb = 'simulated an input signal on';
    }
  } else if (row.subject_type === 'controller_project') {
    const cp = subjects.project.get(id) as { name: string; slug: string } | undefined;
    subject = cp ? { label: cp.name, href: `/projects/${cp.slug}` } : { label: str(d.name) ?? 'a controller project', href: null };
    tone = 'project';
    const model = str(d.reducedModel);
    const words: Record<string, [string, string]> = {
      'project.created': ['created the controller project', ''],
      'project.updated': ['changed the settings of', ''],
      'project.member_added': ['added a member to', ''],
      'project.member_removed': ['removed a member from', ''],
      'pin.created': [`pinned ${model ?? 'a reduced model'} in`, ''],
      'pin.changed': [`changed the pin of ${model ?? 'a reduced model'} in`, ''],
      'pin.removed': [`removed the pin of ${model ?? 'a reduced model'} from`, ''],
      'project_token.created': ['issued a pull token for', ''],
      'project_token.revoked': ['revoked a pull token of', ''],
    };
    if (words[row.action]) [verb, suffix] = words[row.action];
  } else if (row.subject_type === 'user') {
    const person = subjects.person.get(id) as { name: string } | undefined;
    const name = person?.name ?? str(d.email) ?? 'someone';
    tone = 'people';
    subject = null;
    const words: Record<string, string> = {
      'user.invited': `invited ${name}`,
      'user.reinvited': `invited ${name} again`,
      'user.role_changed': `changed the role of ${name}${str(d.to) ? ` to ${d.to}` : ''}`,
      'user.deactivated': `deactivated ${name}`,
      'user.reactivated': `reactivated ${name}`,
      'user.reset_link_sent': `sent ${name} a password reset link`,
      'user.notifications_changed': 'changed their mail notifications',
    };
    if (row.action === 'user.invitation_accepted' || row.action === 'user.password_reset') {
      // Recorded without an actor: the person did it, through their own link.
      actorName = name;
      verb = row.action === 'user.invitation_accepted' ? 'accepted the invitation and joined the shelf' : 'set a new password';
    } else verb = words[row.action] ?? `recorded ${row.action} for ${name}`;
  } else if (row.subject_type === 'job') {
    const job = subjects.job.get(id) as { kind: string } | undefined;
    const kind = job?.kind ?? str(d.kind) ?? '';
    const what = `${kind ? `${kind} ` : ''}job`;
    verb =
      row.action === 'job.retried'
        ? `retried a failed ${what}`
        : row.action === 'job.cancelled'
          ? `cancelled ${d.status === 'running' ? 'a running' : 'a queued'} ${what}`
          : row.action === 'job.requeued'
            ? `queued a cancelled ${what} again`
            : `recorded ${row.action} on a job`;
  }
  return { ...base, tone, actorName, verb, subject, suffix, detail, ...(upstreamChangedCount !== undefined ? { upstreamChangedCount } : {}) };
}

/**
 * The shelf's latest events from the audit log, newest first: uploads, reductions, review steps, projects,
 * pins and tokens, the seed's as well as every person's. Events about people (invitations, roles, resets)
 * are shown to admins only.
 */
export async function recentActivity(limit = 15, options: { withPeople?: boolean } = {}): Promise<ActivityItem[]> {
  const query = db()('audit_events as ae')
    .leftJoin('users as u', 'u.id', 'ae.actor_id')
    .orderBy('ae.id', 'desc')
    .limit(limit)
    .select('ae.id', 'ae.at', 'ae.action', 'ae.subject_type', 'ae.subject_id', 'ae.details', 'u.name as actor_name');
  if (!options.withPeople) query.whereNot('ae.subject_type', 'user');
  const rows = (await query) as AuditRow[];
  const subjects = await subjectsOf(rows);
  return rows.map((r) => describe(r, subjects));
}

async function sentBackTo(authorId: string): Promise<SentBack[]> {
  const rows = await versionLineage<{ reviewerName: string; comment: string; sentBackAt: Date }>(db(), {
    reviewerName: 'u.name',
    comment: 'rw.body',
    sentBackAt: 'rw.created_at',
  })
    .join('reviews as rw', (j) => j.on('rw.reduced_version_id', 'rv.id').andOnVal('rw.event', '=', 'revise'))
    .join('users as u', 'u.id', 'rw.actor_id')
    .where({ 'rv.author_id': authorId, 'rv.status': 'revise' satisfies VersionStatus })
    // Answered once a next draft exists.
    .whereNotExists(db()('reduced_versions as nxt').whereRaw('nxt.predecessor_id = rv.id').andWhereRaw('nxt.source_version_id = rv.source_version_id'))
    .orderBy('rw.id', 'desc');
  return rows.map((r) => ({
    versionId: r.versionId,
    reducedModelName: r.reducedModelName,
    number: r.versionNumber,
    reviewerName: r.reviewerName,
    comment: r.comment,
    at: r.sentBackAt.toISOString(),
  }));
}

const AUTHOR_ROLES: readonly Role[] = ['engineer', 'reviewer', 'admin'];

export async function dashboardActivity(viewer: Actor): Promise<DashboardActivity> {
  const queue = await reviewQueue(viewer);
  const authors = AUTHOR_ROLES.includes(viewer.role);
  const [sentBackToYou, yourUpstreamChanged, recent] = await Promise.all([
    authors ? sentBackTo(viewer.id) : Promise.resolve([]),
    authors ? upstreamChangedVersions({ authorId: viewer.id, limit: 20 }) : Promise.resolve([]),
    recentActivity(15, { withPeople: viewer.role === 'admin' }),
  ]);
  return {
    awaitingYourReview: queue.filter((q) => q.yoursToDecide),
    yoursInReview: queue.filter((q) => q.authorId === viewer.id),
    sentBackToYou,
    yourUpstreamChanged,
    recent,
  };
}
