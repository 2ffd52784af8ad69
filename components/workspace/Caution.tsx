/**
 * The caution every reduced-model page carries (DESIGN.md §8). No client state; renders on the server.
 * The text itself lives in caution-text.ts so exports written by lib/ can use it without React.
 */
import { CAUTION_POINTS, CAUTION_TEXT, CAUTION_TITLE } from './caution-text';

export { CAUTION_POINTS, CAUTION_TEXT, CAUTION_TITLE };

export function Caution({ className }: { className?: string }) {
  return (
    <aside
      role="note"
      aria-label={CAUTION_TITLE}
      data-testid="caution"
      className={`rounded-sheet border border-l-4 border-rule-strong border-l-okabe-orange bg-sheet-raised px-4 py-3 text-sm ${className ?? ''}`}
    >
      <p className="font-semibold">{CAUTION_TITLE}</p>
      <p className="mt-1 leading-relaxed">{CAUTION_TEXT}</p>
    </aside>
  );
}
