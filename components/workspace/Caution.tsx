/**
 * The caution every reduced-model page carries. No client state; renders on the server. The words live in
 * lib/caution.ts, where the exports take them too.
 */
import { CAUTION_TEXT, CAUTION_TITLE } from '@/lib/caution';

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
