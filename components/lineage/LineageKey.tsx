import { PROJECT_STYLE, SOURCE_VERSION_STYLE, STATUS_STYLE } from '@/components/review/status-style';
import { VERSION_STATUSES } from '@/lib/review/state-machine';

/** The key to the lineage graph's shapes. */
export function LineageKey() {
  const items = [SOURCE_VERSION_STYLE, ...VERSION_STATUSES.map((s) => STATUS_STYLE[s]), PROJECT_STYLE];
  return (
    <ul aria-label="Key" className="flex flex-wrap gap-x-5 gap-y-1 text-xs text-graphite-soft">
      {items.map((style) => (
        <li key={style.label} className="inline-flex items-center gap-1">
          <span aria-hidden="true" style={{ color: style.color }}>
            {style.glyph}
          </span>
          {style.label}
        </li>
      ))}
    </ul>
  );
}
