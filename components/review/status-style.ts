/**
 * How a reduced-model version's state is drawn wherever it appears (badges, the review queue, the lineage
 * graph): a shape and its text glyph carry the meaning, the word is always written beside it, and the
 * Okabe & Ito (2008) colour only repeats it, so the state reads in greyscale and for every colour vision.
 * Source versions and controller projects get shapes of their own for the lineage graph.
 */
import { OKABE_ITO, INK } from '@/components/charts/theme';
import { STATUS_LABELS, type VersionStatus } from '@/lib/review/state-machine';

export interface NodeStyle {
  /** ECharts symbol name */
  symbol: string;
  /** the same shape as a text character, for badges and tables */
  glyph: string;
  label: string;
  color: string;
}

export const STATUS_STYLE: Readonly<Record<VersionStatus, NodeStyle>> = {
  draft: { symbol: 'emptyCircle', glyph: '○', label: STATUS_LABELS.draft, color: INK.graphiteMuted },
  in_review: { symbol: 'diamond', glyph: '◆', label: STATUS_LABELS.in_review, color: OKABE_ITO.orange },
  approved: { symbol: 'circle', glyph: '●', label: STATUS_LABELS.approved, color: OKABE_ITO.bluishGreen },
  revise: { symbol: 'triangle', glyph: '▲', label: STATUS_LABELS.revise, color: OKABE_ITO.vermillion },
  retired: { symbol: 'emptyRect', glyph: '□', label: STATUS_LABELS.retired, color: INK.graphiteMuted },
};

export const SOURCE_VERSION_STYLE: NodeStyle = { symbol: 'roundRect', glyph: '▬', label: 'source version', color: OKABE_ITO.blue };
export const PROJECT_STYLE: NodeStyle = { symbol: 'pin', glyph: '⬣', label: 'controller project', color: OKABE_ITO.reddishPurple };

/** The mark shown beside an upstream-changed version: words first, the arrow only repeats them. */
export const UPSTREAM_CHANGED_TEXT = 'upstream changed';
