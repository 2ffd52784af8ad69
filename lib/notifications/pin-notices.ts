// Mail to controller project members when something they pin changes (issue 7):
//   - a newer approved version satisfies the pin (a "newest approved" pin then resolves to it; an exact
//     pin stays where it is, and members hear that a newer version exists);
//   - the version a pin resolved to is retired;
//   - the source model of the resolved version gets a newer version (upstream changed).
//
// queuePinNotices() reconciles rather than reacting to one event: it resolves the pins, compares each with
// what members were last told (pins.notice_state), and in the same transaction records the new state and
// queues the differences into the notification mail queue (queue.ts, kind 'pin_changed'), one message per
// member per project. Calling it twice queues nothing the second time, and a change made by any process (an
// approval, a retirement, a new source version) is picked up by the next call. It runs in each notification
// round (sender.ts): right after a request that queued mail commits, and on the worker's interval; the round
// then delivers the queue. Row locks on the pins keep two
// concurrent rounds from queueing the same change twice.
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { appUrl } from '@/lib/config';
import { loadVersionFacts, noticeStateOf, resolvePin, specOf, type NoticeState, type PinRow } from '@/lib/pins';
import { renderNotice } from '@/lib/notifications/mail';
import { PIN_NOTICE_KIND, queueMail } from '@/lib/notifications/queue';

export type PinChangeKind = 'newer_approved' | 'retired' | 'upstream_changed';

export interface PinChange {
  pinId: string;
  projectId: string;
  projectSlug: string;
  projectName: string;
  reducedModelSlug: string;
  kind: PinChangeKind;
  /** The version number the change is about (for the dedupe key). */
  versionNumber: number | null;
  message: string;
}

export interface NoticeFilter {
  /** Pins of these reduced models (after an approval or retirement). */
  reducedModelIds?: readonly string[];
  /** Pins of reduced models made from these source models (after a new source version). */
  sourceModelIds?: readonly string[];
}

type PinForNotice = PinRow & { model_slug: string; project_slug: string; project_name: string };

export function describeChanges(
  pin: PinForNotice,
  before: NoticeState | null,
  after: NoticeState,
  versionNumber: (id: string | null) => number | null,
  retiredIds: ReadonlySet<string>,
): PinChange[] {
  const changes: PinChange[] = [];
  const base = { pinId: pin.id, projectId: pin.project_id, projectSlug: pin.project_slug, projectName: pin.project_name, reducedModelSlug: pin.model_slug };
  const was = before?.resolvedVersionId ?? null;
  const now = after.resolvedVersionId;
  if (after.newestSatisfyingNumber !== null && (before?.newestSatisfyingNumber ?? 0) < after.newestSatisfyingNumber) {
    changes.push({
      ...base,
      kind: 'newer_approved',
      versionNumber: after.newestSatisfyingNumber,
      message:
        pin.mode === 'exact'
          ? `v${after.newestSatisfyingNumber} of ${pin.model_slug} is approved; this exact pin stays at v${versionNumber(now)}.`
          : `v${after.newestSatisfyingNumber} of ${pin.model_slug} is approved and meets the pin's limits; the pin now resolves to it${was && was !== now ? ` (was v${versionNumber(was)})` : ''}.`,
    });
  }
  if (was && retiredIds.has(was) && !before?.retired) {
    changes.push({
      ...base,
      kind: 'retired',
      versionNumber: versionNumber(was),
      message:
        pin.mode === 'exact'
          ? `v${versionNumber(was)} of ${pin.model_slug}, which this pin names exactly, has been retired; it can still be downloaded to rebuild, but should not be used for new work.`
          : `v${versionNumber(was)} of ${pin.model_slug} has been retired; the pin now resolves to ${now ? `v${versionNumber(now)}` : 'no version (nothing approved meets its limits)'}.`,
    });
  }
  if (after.upstreamChanged && !(before?.upstreamChanged && was === now)) {
    changes.push({
      ...base,
      kind: 'upstream_changed',
      versionNumber: versionNumber(now),
      message: `The source model of ${pin.model_slug} v${versionNumber(now)} has a newer version: the reduced model was made from an older one and may need to be reduced again.`,
    });
  }
  return changes;
}

/** One mail per member and project: the project's pin changes in a list, and what to do before using them. */
function pinNoticeMail(input: { recipientName: string; projectName: string; url: string; changes: readonly PinChange[] }) {
  return renderNotice(
    `Pins changed: ${input.projectName}`,
    [
      `Hello ${input.recipientName}, pins of the controller project "${input.projectName}" changed:`,
      input.changes.map((c) => `- ${c.message}`).join('\n'),
      'Before a changed reduced model goes into the controller, download it again, update modeshelf.lock.json, and verify closed-loop behaviour against the full model and on the hardware.',
    ],
    null,
    { url: input.url, label: 'Open the project' },
    'You receive this as a member of the project; an engineer member can remove you from it.',
  );
}

/**
 * Reconciles the affected pins (every pin when no filter is given) and queues mail about their changes.
 * Returns the changes found and the number of mails queued; delivery is the notification round's.
 */
export async function queuePinNotices(filter: NoticeFilter = {}, outer: Knex = db()): Promise<{ changes: PinChange[]; queued: number }> {
  return outer.transaction(async (trx) => {
    const query = trx('pins as p')
      .join('reduced_models as rm', 'rm.id', 'p.reduced_model_id')
      .join('controller_projects as cp', 'cp.id', 'p.project_id')
      .select('p.*', 'rm.slug as model_slug', 'cp.slug as project_slug', 'cp.name as project_name')
      .orderBy('p.id')
      .forUpdate('p');
    if (filter.reducedModelIds || filter.sourceModelIds) {
      query.where((w) => {
        if (filter.reducedModelIds) w.orWhereIn('p.reduced_model_id', [...filter.reducedModelIds]);
        if (filter.sourceModelIds) w.orWhereIn('rm.source_model_id', [...filter.sourceModelIds]);
      });
    }
    const pins: PinForNotice[] = await query;
    const facts = await loadVersionFacts(pins.map((p) => p.reduced_model_id), trx);
    const changes: PinChange[] = [];
    for (const pin of pins) {
      const versions = facts.get(pin.reduced_model_id) ?? [];
      const after = noticeStateOf(resolvePin(specOf(pin), versions));
      const before = pin.notice_state;
      if (JSON.stringify(before) === JSON.stringify(after)) continue;
      const numberOf = (id: string | null) => versions.find((v) => v.id === id)?.number ?? null;
      const retiredIds = new Set(versions.filter((v) => v.status === 'retired').map((v) => v.id));
      changes.push(...describeChanges(pin, before, after, numberOf, retiredIds));
      await trx('pins').where({ id: pin.id }).update({ notice_state: JSON.stringify(after) });
    }

    let queued = 0;
    const byProject = new Map<string, PinChange[]>();
    for (const c of changes) byProject.set(c.projectId, [...(byProject.get(c.projectId) ?? []), c]);
    for (const [projectId, list] of byProject) {
      // One key per set of changes and member: a change queued once is never queued again.
      const identity = createHash('sha256')
        .update(list.map((c) => `${c.pinId}:${c.kind}:${c.versionNumber}`).sort().join('|'))
        .digest('hex')
        .slice(0, 32);
      const members = await trx('project_members as m')
        .join('users as u', 'u.id', 'm.user_id')
        .where('m.project_id', projectId)
        .andWhere('u.active', true)
        .whereNotNull('u.password_hash')
        .select('u.id', 'u.email', 'u.name');
      for (const member of members) {
        const content = pinNoticeMail({
          recipientName: member.name,
          projectName: list[0].projectName,
          url: `${appUrl()}/projects/${list[0].projectSlug}`,
          changes: list,
        });
        if (await queueMail(trx, { kind: PIN_NOTICE_KIND, recipient: member, content, dedupeKey: `pins:${identity}:${member.id}` })) queued += 1;
      }
    }
    return { changes, queued };
  });
}
