// The order in which modal truncation keeps modes (reduction/mode-ranking.ts): the engine's ranking of its
// modal form and the ranking of stored mode records (order slider, recipe form) are the same rule. The
// modes below are made up; the expected orders follow from the rules by hand.
import { describe, expect, it } from 'vitest';
import { rankStoredModes, statesInBand, type StoredMode } from '@/reduction/mode-ranking';
import { rankedModalForm } from '@/reduction/modal';
import { fromRows } from '@/reduction/linalg/index';

const MODES: StoredMode[] = [
  { re: -0.5, im: 0, states: 1, stability: 'stable', dominance: 2 },
  { re: -10, im: 30, states: 2, stability: 'stable', dominance: 8 },
  { re: -0.1, im: 0, states: 1, stability: 'stable', dominance: 0.5 },
  { re: 0, im: 0, states: 1, stability: 'marginal', dominance: null },
  { re: -100, im: 0, states: 1, stability: 'stable', dominance: 8 },
];

describe('mode ranking', () => {
  it('ranks by dominance, slowest first, or the band first, leaving marginal modes out', () => {
    expect(rankStoredModes(MODES, { rule: 'dominance' }).map((m) => m.re)).toEqual([-10, -100, -0.5, -0.1]);
    expect(rankStoredModes(MODES, { rule: 'slowest' }).map((m) => m.re)).toEqual([-0.1, -0.5, -10, -100]);
    // |−10 + 30j| = 31.6 and |−0.5| lie in [0.2, 40]; then the rest by dominance
    expect(rankStoredModes(MODES, { rule: 'band', band: [0.2, 40] }).map((m) => m.re)).toEqual([-10, -0.5, -100, -0.1]);
  });

  it('counts the states of the stable modes in a band', () => {
    expect(statesInBand(MODES, [0.2, 40])).toBe(3);
    expect(statesInBand(MODES, [0, 0.05])).toBe(0); // the marginal pole at 0 is kept exactly, not chosen
  });

  it('orders stored records as the engine orders its modal form', () => {
    // Diagonal model: poles −1, −5, −20 with residues 3, 10, 4 → dominance |c b|/|Re λ| = 3, 2, 0.2.
    const model = {
      A: fromRows([[-1, 0, 0], [0, -5, 0], [0, 0, -20]]),
      B: fromRows([[3], [10], [4]]),
      C: fromRows([[1, 1, 1]]),
      D: fromRows([[0]]),
    };
    for (const rule of ['dominance', 'slowest'] as const) {
      const engine = rankedModalForm(model, { rule }).modes.map((m) => m.re);
      const stored = rankStoredModes(
        rankedModalForm(model, { rule: 'dominance' }).modes.map((m) => ({ re: m.re, im: m.im, states: m.states, stability: 'stable' as const, dominance: m.dominance })),
        { rule },
      ).map((m) => m.re);
      expect(stored.map((x) => Math.round(x))).toEqual(engine.map((x) => Math.round(x)));
    }
    expect(rankedModalForm(model, { rule: 'dominance' }).modes.map((m) => Math.round(m.re))).toEqual([-1, -5, -20]);
  });
});
