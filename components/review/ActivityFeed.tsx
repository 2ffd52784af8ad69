import Link from 'next/link';
import type { ActivityItem } from '@/lib/activity';
import { SOURCE_VERSION_STYLE, STATUS_STYLE } from './status-style';
import { formatWhen } from './when';

const WORDS = { submitted: 'submitted for review', approved: 'approved', revise: 'sent back for revision', retired: 'retired' } as const;
const STATE_AFTER = { submitted: 'in_review', approved: 'approved', revise: 'revise', retired: 'retired' } as const;

/** The shelf's latest events, newest first: review steps and new source versions. */
export function ActivityFeed({ items }: { items: ActivityItem[] }) {
  if (items.length === 0) return <p className="text-sm text-graphite-soft">Nothing has happened on the shelf yet.</p>;
  return (
    <ol className="space-y-2 text-sm" aria-label="Recent activity">
      {items.map((item, i) => {
        const style = item.kind === 'source_version' ? SOURCE_VERSION_STYLE : STATUS_STYLE[STATE_AFTER[item.kind]];
        return (
          <li key={i} className="flex gap-2" data-testid="activity-item" data-kind={item.kind}>
            <span aria-hidden="true" style={{ color: style.color }} className="w-4 shrink-0 text-center">
              {style.glyph}
            </span>
            <span className="min-w-0">
              {item.kind === 'source_version' ? (
                <>
                  {item.actorName} registered <Link href={`/lineage/source-models/${item.sourceModelSlug}`}>{item.sourceModelName} v{item.number}</Link>
                  {item.upstreamChangedCount > 0
                    ? `: ${item.upstreamChangedCount} reduced model version${item.upstreamChangedCount === 1 ? '' : 's'} now upstream changed`
                    : ''}
                </>
              ) : (
                <>
                  {item.actorName} {WORDS[item.kind]}{' '}
                  <Link href={`/reviews/${item.versionId}`}>
                    {item.reducedModelName} v{item.number}
                  </Link>
                  <span className="block truncate text-graphite-soft">“{item.body}”</span>
                </>
              )}
              <time className="num block text-xs text-graphite-faint" dateTime={item.at}>
                {formatWhen(item.at)}
              </time>
            </span>
          </li>
        );
      })}
    </ol>
  );
}
