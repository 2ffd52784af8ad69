import { STATUS_STYLE } from './status-style';
import type { VersionStatus } from '@/lib/review/state-machine';

/** A version's state as glyph and word; the colour only repeats what the shape and word say. */
export function StatusBadge({ status }: { status: VersionStatus }) {
  const style = STATUS_STYLE[status];
  return (
    <span
      className="inline-flex items-center gap-1 whitespace-nowrap rounded-sheet border border-rule-strong bg-sheet px-1.5 py-0.5 text-xs"
      data-testid="status-badge"
      data-status={status}
    >
      <span aria-hidden="true" style={{ color: style.color }}>
        {style.glyph}
      </span>
      {style.label}
    </span>
  );
}

/** Shown beside a version whose source model has a newer version. */
export function UpstreamChangedBadge({ newestSourceNumber, sourceNumber }: { newestSourceNumber: number; sourceNumber: number }) {
  return (
    <span
      className="inline-flex items-center gap-1 whitespace-nowrap rounded-sheet border border-okabe-orange bg-sheet px-1.5 py-0.5 text-xs"
      data-testid="upstream-changed"
      title={`Reduced from source v${sourceNumber}; the source model now has v${newestSourceNumber}.`}
    >
      <span aria-hidden="true">↑</span>
      upstream changed (source v{sourceNumber} → v{newestSourceNumber})
    </span>
  );
}
