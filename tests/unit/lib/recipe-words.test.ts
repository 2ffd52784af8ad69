// The recipe in words (lib/recipe-words.ts), written once for the pages, the lineage graph, the recipe form
// and the exports. The recipes are made up; the expected phrases are the house wording.
import { describe, expect, it } from 'vitest';
import { describeRecipe, methodChoiceLabel, methodName, methodOrderLabel } from '@/lib/recipe-words';

const NB = '\u00a0';

describe('recipe words', () => {
  it('names each method, for running text, the form and the lineage graph', () => {
    expect(methodName('residualization')).toBe('balanced residualization');
    expect(methodName('something-new')).toBe('something-new');
    expect(methodChoiceLabel('residualization')).toBe('Balanced residualization (keeps the DC gain)');
    expect(methodChoiceLabel('balanced')).toBe('Balanced truncation');
    expect(methodOrderLabel('modal', 6)).toBe('modal truncation, r = 6');
  });

  it('describes a recipe with its selection, band and order rule', () => {
    expect(describeRecipe({ method: 'balanced', order: 12, tolerance: null, options: {} })).toBe('balanced truncation, order 12');
    expect(describeRecipe({ method: 'residualization', order: null, tolerance: 0.01, options: {} }, { resultOrder: 8 })).toBe(
      'balanced residualization, smallest order whose bound is at most 0.01 × ‖G‖∞ (gave 8)',
    );
    expect(describeRecipe({ method: 'modal', order: 4, tolerance: null, options: { selection: 'band', band: { minFrequency: 0.5, maxFrequency: 30 } } }, { timeBase: 'min' })).toBe(
      `modal truncation, modes kept first by band in 0.5–30${NB}rad/min, order 4`,
    );
    const fl = { method: 'frequency-limited', order: 6, tolerance: null, options: { band: { minFrequency: 62.83185307179586, maxFrequency: 376.99111843077515 }, enteredBand: { minFrequency: 10, maxFrequency: 60, unit: 'hz' } } };
    expect(describeRecipe(fl)).toBe(`frequency-limited balanced truncation on the band 62.8–377${NB}rad/s (given as 10–60 Hz), order 6, no a-priori error bound for this method`);
    // The exports' text files: every digit, ASCII only.
    expect(describeRecipe(fl, { plain: true })).toBe(
      'frequency-limited balanced truncation on the band 62.83185307179586 to 376.99111843077515 rad/s (given as 10 to 60 Hz), order 6, no a-priori error bound for this method',
    );
    expect(describeRecipe({ method: 'balanced', order: null, tolerance: 0.001, options: {} }, { plain: true })).toBe('balanced truncation, smallest order whose bound is at most 0.001 x ||G||inf');
  });
});
