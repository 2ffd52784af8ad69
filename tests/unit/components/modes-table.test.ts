import { describe, expect, it } from 'vitest';
import { createTable, getCoreRowModel, getSortedRowModel, type SortingState } from '@tanstack/react-table';
import { modeColumns, toModeTableRows, type ModeInput, type ModeTableRow } from '@/components/workspace/modes-columns';

// Modes chosen so each figure is easy to check by hand (ωn = |λ|, ζ = -Re λ/|λ|, τ = 1/|Re λ|):
//   -3 ± 4j: ωn 5, ζ 0.6, τ 1/3;  -1: ωn 1, ζ 1, τ 1;  0: marginal, ζ undefined, τ ∞;  0.5: unstable, τ 2 (growth)
const MODES: ModeInput[] = [
  { re: -3, im: 4, pair: true, dominance: 0.2 },
  { re: -1, im: 0, dominance: 0.9 },
  { re: 0, im: 0, dominance: null },
  { re: 0.5, im: 0, dominance: 0.5 },
];

function sortedIds(rows: ModeTableRow[], sorting: SortingState, withKept = false): number[] {
  const table = createTable<ModeTableRow>({
    data: rows,
    columns: modeColumns('s', withKept),
    state: { sorting, columnPinning: {}, columnVisibility: {} },
    onStateChange: () => undefined,
    renderFallbackValue: null,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return table.getRowModel().rows.map((r) => Number(r.id));
}

describe('modes table rows', () => {
  const rows = toModeTableRows(MODES);

  it('derives natural frequency, damping ratio and time constant, computed by hand', () => {
    expect(rows[0]).toMatchObject({ naturalFrequency: 5, dampingRatio: 0.6, stability: 'stable', pair: true });
    expect(rows[0].timeConstant).toBeCloseTo(1 / 3, 15);
    // A marginal pole has no time constant (shown as ∞) and, at λ = 0, no damping ratio (reduction/poles.ts).
    expect(rows[2]).toMatchObject({ stability: 'marginal', timeConstant: null, dampingRatio: null });
    expect(rows[3]).toMatchObject({ stability: 'unstable', timeConstant: 2, growing: true });
  });

  it('rejects a pole that is not a finite number, naming the row', () => {
    expect(() => toModeTableRows([{ re: NaN, im: 0 }])).toThrow(/ModesTable: modes\[0\] must have a finite pole/);
  });

  it('sorts by every column, numbers as numbers', () => {
    expect(sortedIds(rows, [{ id: 'naturalFrequency', desc: false }])).toEqual([2, 3, 1, 0]);
    expect(sortedIds(rows, [{ id: 'timeConstant', desc: true }])).toEqual([2, 3, 1, 0]);
    expect(sortedIds(rows, [{ id: 'pole', desc: false }])).toEqual([0, 1, 2, 3]);
    expect(sortedIds(rows, [{ id: 'stability', desc: false }])).toEqual([3, 2, 0, 1]);
  });

  it('puts undefined damping and missing dominance last in either direction', () => {
    expect(sortedIds(rows, [{ id: 'dampingRatio', desc: false }])).toEqual([3, 0, 1, 2]);
    expect(sortedIds(rows, [{ id: 'dampingRatio', desc: true }])).toEqual([1, 0, 3, 2]);
    expect(sortedIds(rows, [{ id: 'dominance', desc: true }])).toEqual([1, 3, 0, 2]);
    expect(sortedIds(rows, [{ id: 'dominance', desc: false }])).toEqual([0, 3, 1, 2]);
  });

  it('adds a kept column only when a reduction is shown', () => {
    expect(modeColumns('s', false).map((c) => c.id)).toEqual(['pole', 'stability', 'naturalFrequency', 'dampingRatio', 'timeConstant', 'dominance']);
    const kept = toModeTableRows(MODES.map((m, i) => ({ ...m, kept: i % 2 === 0 })));
    expect(sortedIds(kept, [{ id: 'kept', desc: true }], true)).toEqual([0, 2, 1, 3]);
  });

  it('writes cells as monospace-ready text: a pair once with ±, growth marked, missing dominance as a dash', () => {
    const table = createTable<ModeTableRow>({
      data: rows,
      columns: modeColumns('s'),
      state: { columnPinning: {}, columnVisibility: {} },
      onStateChange: () => undefined,
      renderFallbackValue: null,
      getCoreRowModel: getCoreRowModel(),
    });
    const text = table.getRowModel().rows.map((r) =>
      r.getVisibleCells().map((c) => (c.column.columnDef.cell as (ctx: unknown) => string)(c.getContext())),
    );
    expect(text[0]).toEqual(['-3 ± 4j', '● stable', '5', '0.6', '0.333', '0.2']);
    expect(text[2]).toEqual(['0', '◆ marginal', '0', '—', '∞', '—']);
    expect(text[3][1]).toBe('▲ unstable');
    expect(text[3][4]).toBe('2 (growth)');
  });

  it('puts the units in the headers', () => {
    const headers = modeColumns('h').map((c) => c.header);
    expect(headers).toContain('Natural frequency ωn (rad/h)');
    expect(headers).toContain('Time constant τ (h)');
  });
});
