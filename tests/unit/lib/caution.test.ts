// The caution that every reduced-model page and export carries (lib/caution.ts): every point is there,
// and the text survives a C comment and a CSV cell unchanged.
import { describe, expect, it } from 'vitest';
import { CAUTION_POINTS, CAUTION_TEXT } from '@/lib/caution';

describe('the caution', () => {
  it('covers every point: danger, approximation within bounds and band, verification, safety process, review not certification', () => {
    expect(CAUTION_TEXT).toMatch(/machine that can injure people/);
    expect(CAUTION_TEXT).toMatch(/approximates/);
    expect(CAUTION_TEXT).toMatch(/error bounds/);
    expect(CAUTION_TEXT).toMatch(/frequency band/);
    expect(CAUTION_TEXT).toMatch(/closed-loop behaviour against the full model/);
    expect(CAUTION_TEXT).toMatch(/real hardware/);
    expect(CAUTION_TEXT).toMatch(/functional-safety process/);
    expect(CAUTION_TEXT).toMatch(/codes and standards that apply where the machine runs/);
    expect(CAUTION_TEXT).toMatch(/records that the model was reviewed; it is not a certification/);
  });

  it('is plain ASCII so a C header comment or CSV cell can carry it', () => {
    expect(/^[\x20-\x7e]+$/.test(CAUTION_TEXT)).toBe(true);
    expect(CAUTION_TEXT).not.toContain('*/');
    expect(CAUTION_TEXT).toBe(CAUTION_POINTS.join(' '));
  });
});
