/**
 * Rows and TanStack column definitions of the modes table, kept free of JSX so the sorting can be
 * checked in node. Units are in the headers; cells hold bare numbers in the monospace face.
 */
import { createColumnHelper, type ColumnDef, type SortingFn } from '@tanstack/react-table';
import { formatComplex, formatNumber, frequencyUnit } from '@/lib/format';
import { classifyPoles, modalFigures, type PoleStability } from '@/reduction/poles';
import { ChartDataError } from '../charts/series-checks';
import { STABILITY_STYLE } from '../charts/theme';

export interface ModeInput {
  readonly re: number;
  readonly im: number;
  /** the engine's dominance measure (larger matters more); absent when not ranked */
  readonly dominance?: number | null;
  readonly kept?: boolean;
  readonly stability?: PoleStability;
  /** the row stands for a complex-conjugate pair, written once as re ± j|im| */
  readonly pair?: boolean;
}

export interface ModeTableRow {
  readonly re: number;
  readonly im: number;
  readonly pair: boolean;
  readonly stability: PoleStability;
  readonly naturalFrequency: number;
  /** null at λ = 0 */
  readonly dampingRatio: number | null;
  /** null for a marginal pole (shown as ∞) */
  readonly timeConstant: number | null;
  readonly growing: boolean;
  readonly dominance: number | null;
  readonly kept: boolean | null;
}

export function toModeTableRows(modes: readonly ModeInput[]): ModeTableRow[] {
  modes.forEach((m, i) => {
    if (!Number.isFinite(m.re) || !Number.isFinite(m.im)) {
      throw new ChartDataError('ModesTable', `modes[${i}]`, `must have a finite pole (got ${m.re} + ${m.im}j)`);
    }
  });
  const missing = modes.some((m) => m.stability === undefined);
  const split = missing ? classifyPoles({ re: modes.map((m) => m.re), im: modes.map((m) => m.im) }).stability : null;
  return modes.map((m, i) => {
    const stability = m.stability ?? split![i];
    const f = modalFigures(m.re, m.im, stability);
    return {
      re: m.re,
      im: m.im,
      pair: m.pair ?? false,
      stability,
      naturalFrequency: f.naturalFrequency,
      dampingRatio: f.dampingRatio,
      timeConstant: f.timeConstant,
      growing: f.growing,
      dominance: m.dominance ?? null,
      kept: m.kept ?? null,
    };
  });
}

/** NaN and null become undefined, which TanStack sorts last in either direction. */
function sortable(x: number | null): number | undefined {
  return x === null || Number.isNaN(x) ? undefined : x;
}

/** Poles sort by real part (decay rate), then by the size of the imaginary part. */
export const byPole: SortingFn<ModeTableRow> = (a, b) =>
  a.original.re - b.original.re || Math.abs(a.original.im) - Math.abs(b.original.im);

const STABILITY_RANK: Record<PoleStability, number> = { unstable: 0, marginal: 1, stable: 2 };

export function modeColumns(timeBase = 's', withKept = false): ColumnDef<ModeTableRow, unknown>[] {
  const col = createColumnHelper<ModeTableRow>();
  const columns = [
    col.accessor((r) => r.re, {
      id: 'pole',
      header: 'Pole λ',
      sortingFn: byPole,
      cell: (c) => formatComplex(c.row.original.re, c.row.original.im, { pair: c.row.original.pair, significant: 4 }),
    }),
    col.accessor((r) => STABILITY_RANK[r.stability], {
      id: 'stability',
      header: 'Stability',
      cell: (c) => `${STABILITY_STYLE[c.row.original.stability].glyph} ${c.row.original.stability}`,
    }),
    col.accessor((r) => sortable(r.naturalFrequency), {
      id: 'naturalFrequency',
      header: `Natural frequency ωn (${frequencyUnit(timeBase)})`,
      sortUndefined: 'last',
      cell: (c) => formatNumber(c.row.original.naturalFrequency, { significant: 4 }),
    }),
    col.accessor((r) => sortable(r.dampingRatio), {
      id: 'dampingRatio',
      header: 'Damping ratio ζ',
      sortUndefined: 'last',
      cell: (c) => (c.row.original.dampingRatio === null ? '—' : formatNumber(c.row.original.dampingRatio, { significant: 3 })),
    }),
    // A marginal pole neither decays nor grows: its τ is infinite, and sorts after every finite one.
    col.accessor((r) => r.timeConstant ?? Infinity, {
      id: 'timeConstant',
      header: `Time constant τ (${timeBase})`,
      cell: (c) =>
        c.row.original.timeConstant === null
          ? '∞'
          : `${formatNumber(c.row.original.timeConstant, { significant: 3 })}${c.row.original.growing ? ' (growth)' : ''}`,
    }),
    col.accessor((r) => sortable(r.dominance), {
      id: 'dominance',
      header: 'Dominance',
      sortUndefined: 'last',
      sortDescFirst: true,
      cell: (c) => (c.row.original.dominance === null ? '—' : formatNumber(c.row.original.dominance, { significant: 3 })),
    }),
  ] as ColumnDef<ModeTableRow, unknown>[];
  if (withKept) {
    columns.push(
      col.accessor((r) => (r.kept === null ? undefined : r.kept ? 1 : 0), {
        id: 'kept',
        header: 'Kept',
        sortUndefined: 'last',
        cell: (c) => (c.row.original.kept === null ? '—' : c.row.original.kept ? 'kept' : 'truncated'),
      }) as ColumnDef<ModeTableRow, unknown>,
    );
  }
  return columns;
}
