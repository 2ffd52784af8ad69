import Link from 'next/link';
import type { ActivityItem, ActivityTone } from '@/lib/activity';
import { PROJECT_STYLE, SOURCE_VERSION_STYLE, STATUS_STYLE, type NodeStyle } from './status-style';
import { INK } from '@/components/charts/theme';
import { formatWhen } from './when';

const PEOPLE_STYLE: NodeStyle = { symbol: 'circle', glyph: '◇', label: 'people', color: INK.graphiteMuted };
const JOB_STYLE: NodeStyle = { symbol: 'circle', glyph: '↻', label: 'job', color: INK.graphiteMuted };

const TONE_STYLE: Record<ActivityTone, NodeStyle> = {
  source: SOURCE_VERSION_STYLE,
  draft: STATUS_STYLE.draft,
  in_review: STATUS_STYLE.in_review,
  approved: STATUS_STYLE.approved,
  revise: STATUS_STYLE.revise,
  retired: STATUS_STYLE.retired,
  project: PROJECT_STYLE,
  people: PEOPLE_STYLE,
  job: JOB_STYLE,
};

/** The shelf's latest events from the audit log, newest first (lib/activity.ts). */
export function ActivityFeed({ items }: { items: ActivityItem[] }) {
  if (items.length === 0) return <p className="text-sm text-graphite-soft">Nothing has happened on the shelf yet.</p>;
  return (
    <ol className="space-y-2 text-sm" aria-label="Recent activity">
      {items.map((item) => {
        const style = TONE_STYLE[item.tone];
        return (
          <li key={item.id} className="flex gap-2" data-testid="activity-item" data-action={item.action}>
            <span aria-hidden="true" style={{ color: style.color }} className="w-4 shrink-0 text-center">
              {style.glyph}
            </span>
            <span className="min-w-0">
              {item.actorName} {item.verb}
              {item.subject ? (
                <>
                  {' '}
                  {item.subject.href ? <Link href={item.subject.href}>{item.subject.label}</Link> : item.subject.label}
                </>
              ) : null}
              {item.suffix}
              {item.detail ? <span className="block truncate text-graphite-soft">{item.action.startsWith('reduced_version.') ? `“${item.detail}”` : item.detail}</span> : null}
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
