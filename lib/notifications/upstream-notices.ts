// "Upstream changed" mail: for each source version registered since the last sweep, one mail to each author
// (who wants it) of a live reduced version derived from an older version of that source model. Run in each
// notification round (sender.ts). The derived versions themselves are read in lib/upstream.ts.
import { db } from '@/lib/db';
import { appUrl } from '@/lib/config';
import { LIVE_STATUSES } from '@/lib/upstream';
import { versionLineage } from '@/lib/version-lineage';
import { recipientsFor } from '@/lib/notifications/preferences';
import { queueMail } from '@/lib/notifications/queue';
import { upstreamChangedMail } from '@/lib/notifications/mail';

/**
 * Queues the mails of each source version not yet swept. Each source version is claimed in
 * upstream_notices inside the same transaction as its mails, so two sweeps never both mail. Returns how
 * many mails were queued.
 */
export async function queueUpstreamNotices(limit = 20): Promise<number> {
  const fresh = await db()('source_versions as sv')
    .whereNotExists(db()('upstream_notices as n').whereRaw('n.source_version_id = sv.id'))
    .orderBy('sv.created_at')
    .limit(limit)
    .select('sv.id');
  let queued = 0;
  for (const { id } of fresh) {
    queued += await db().transaction(async (trx) => {
      const claimed = await trx('upstream_notices').insert({ source_version_id: id }).onConflict('source_version_id').ignore().returning('source_version_id');
      if (claimed.length === 0) return 0;
      const sv = await trx('source_versions as sv')
        .join('source_models as sm', 'sm.id', 'sv.source_model_id')
        .join('users as u', 'u.id', 'sv.uploaded_by')
        .where('sv.id', id)
        .first('sv.number', 'sv.source_model_id', 'sm.name', 'sm.slug', 'u.name as uploader_name');
      const derived = await versionLineage(trx)
        .where('sm.id', sv.source_model_id)
        .andWhere('sv.number', '<', sv.number)
        .whereIn('rv.status', LIVE_STATUSES as string[])
        .orderBy(['rm.name', 'rv.number']);
      const byAuthor = new Map<string, { reducedModelName: string; number: number; sourceNumber: number }[]>();
      for (const d of derived) {
        const list = byAuthor.get(d.authorId) ?? [];
        list.push({ reducedModelName: d.reducedModelName, number: d.versionNumber, sourceNumber: d.sourceVersionNumber });
        byAuthor.set(d.authorId, list);
      }
      let count = 0;
      if (byAuthor.size > 0) {
        const recipients = await recipientsFor(trx, 'upstream_changed', { userIds: [...byAuthor.keys()] });
        for (const recipient of recipients) {
          const content = upstreamChangedMail({
            recipientName: recipient.name,
            sourceModelName: sv.name,
            newNumber: sv.number,
            uploaderName: sv.uploader_name,
            derived: byAuthor.get(recipient.id)!,
            url: `${appUrl()}/lineage/source-models/${sv.slug}`,
          });
          if (await queueMail(trx, { kind: 'upstream_changed', recipient, content, dedupeKey: `upstream:${id}:${recipient.id}` })) count += 1;
        }
      }
      await trx('upstream_notices').where({ source_version_id: id }).update({ recipients: count });
      return count;
    });
  }
  return queued;
}
