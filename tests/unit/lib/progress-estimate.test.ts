// The time-left estimate of a running job (lib/jobs/progress-estimate.ts) and the words the progress bar
// shows for it and for a stage's counts (components/workspace/progress.ts, lib/engine-tasks/progress.ts).
// Expected values are the linear extrapolations worked out by hand from the inputs; the clock is fixed.
import { describe, expect, it } from 'vitest';
import { estimateTimeLeft, MIN_ELAPSED_S, MIN_FRACTION } from '@/lib/jobs/progress-estimate';
import { cleanDetail, scientific } from '@/lib/engine-tasks/progress';
import { countsText, timeLeftText } from '@/components/workspace/progress';

const NOW = new Date('2026-12-05T10:00:00Z');
const ago = (s: number) => new Date(NOW.getTime() - s * 1000);

describe('estimateTimeLeft', () => {
  it('extrapolates the whole attempt from its fraction: 40 s for a quarter done leaves 120 s', () => {
    const t = estimateTimeLeft({ status: 'running', fraction: 0.25, detail: null, attemptStartedAt: ago(40), stageStartedAt: ago(10), now: NOW });
    expect(t).toEqual({ seconds: 120, lowerBound: false, basis: 'fraction' });
  });

  it('takes the larger of the two when the stage counts promise more than the fraction', () => {
    // whole: 30 s · 0.5/0.5 = 30 s; stage: 20 s for 10 of 60 frequencies → 20 · 50/10 = 100 s
    const t = estimateTimeLeft({
      status: 'running',
      fraction: 0.5,
      detail: { done: 10, total: 60, unit: 'frequency' },
      attemptStartedAt: ago(30),
      stageStartedAt: ago(20),
      now: NOW,
    });
    expect(t).toEqual({ seconds: 100, lowerBound: false, basis: 'fraction and counts' });
    // and the fraction's when it is the larger: 90 s · 0.9/0.1 = 810 s against the stage's 100 s
    const u = estimateTimeLeft({
      status: 'running',
      fraction: 0.1,
      detail: { done: 10, total: 60, unit: 'frequency' },
      attemptStartedAt: ago(90),
      stageStartedAt: ago(20),
      now: NOW,
    });
    expect(u?.seconds).toBe(810);
  });

  it('gives the stage alone as a lower bound while the fraction is too small to go on', () => {
    // stage: 3 s for 1 of 7 orders → 3 · 6 = 18 s; the attempt is only 1 % through
    const t = estimateTimeLeft({
      status: 'running',
      fraction: MIN_FRACTION / 2,
      detail: { done: 1, total: 7, unit: 'order' },
      attemptStartedAt: ago(3),
      stageStartedAt: ago(3),
      now: NOW,
    });
    expect(t).toEqual({ seconds: 18, lowerBound: true, basis: 'counts' });
  });

  it('does not extrapolate a capped loop ("at most"): it may stop at its tolerance any step', () => {
    const t = estimateTimeLeft({
      status: 'running',
      fraction: 0.01,
      detail: { done: 14, total: 200, atMost: true, unit: 'ADI step', note: 'residual 3·10⁻⁷' },
      attemptStartedAt: ago(30),
      stageStartedAt: ago(20),
      now: NOW,
    });
    expect(t).toBeNull();
  });

  it('gives nothing too early, for a job that is not running, or for a count of zero', () => {
    const base = { detail: null, stageStartedAt: ago(1), now: NOW };
    expect(estimateTimeLeft({ ...base, status: 'running', fraction: 0.5, attemptStartedAt: ago(MIN_ELAPSED_S / 2) })).toBeNull();
    expect(estimateTimeLeft({ ...base, status: 'running', fraction: 0, attemptStartedAt: ago(60) })).toBeNull();
    expect(estimateTimeLeft({ ...base, status: 'queued', fraction: 0.5, attemptStartedAt: ago(60) })).toBeNull();
    expect(estimateTimeLeft({ ...base, status: 'cancelled', fraction: 0.5, attemptStartedAt: ago(60) })).toBeNull();
    expect(estimateTimeLeft({ ...base, status: 'running', fraction: 0.5, attemptStartedAt: null })).toBeNull();
    expect(
      estimateTimeLeft({ status: 'running', fraction: 0, detail: { done: 0, total: 10, unit: 'order' }, attemptStartedAt: ago(5), stageStartedAt: ago(5), now: NOW }),
    ).toBeNull();
  });

  it('rounds up to whole seconds and clamps a fraction outside 0..1', () => {
    // 10 s · (1 − 0.3)/0.3 = 23.33… → 24
    expect(estimateTimeLeft({ status: 'running', fraction: 0.3, detail: null, attemptStartedAt: ago(10), stageStartedAt: null, now: NOW })?.seconds).toBe(24);
    expect(estimateTimeLeft({ status: 'running', fraction: 1.7, detail: null, attemptStartedAt: ago(10), stageStartedAt: null, now: NOW })?.seconds).toBe(0);
  });
});

describe('progress words', () => {
  it('writes counts with their cap and note', () => {
    expect(countsText({ done: 14, total: 200, atMost: true, unit: 'ADI step', note: `residual ${scientific(3e-7)}` })).toBe('ADI step 14 of at most 200, residual 3·10⁻⁷');
    expect(countsText({ done: 31, total: 60, unit: 'frequency' })).toBe('frequency 31 of 60');
    expect(countsText({ done: 3, unit: 'simulation' })).toBe('simulation 3');
  });

  it('writes figures as a·10ⁿ outside 0.001..10⁴', () => {
    expect(scientific(3e-7)).toBe('3·10⁻⁷');
    expect(scientific(1.234e-10)).toBe('1.2·10⁻¹⁰');
    expect(scientific(25000)).toBe('2.5·10⁴');
    expect(scientific(0.5)).toBe('0.5');
    expect(scientific(0)).toBe('0');
  });

  it('writes the time left in rounded words', () => {
    expect(timeLeftText({ seconds: 3, lowerBound: false })).toBe('a few seconds left');
    expect(timeLeftText({ seconds: 42, lowerBound: false })).toBe('about 40 s left');
    expect(timeLeftText({ seconds: 185, lowerBound: false })).toBe('about 3 min left');
    expect(timeLeftText({ seconds: 18, lowerBound: true })).toBe('at least 20 s left');
    expect(timeLeftText({ seconds: 2 * 3600 + 10 * 60 + 20, lowerBound: false })).toBe('about 2 h 10 min left');
  });

  it('keeps only well-formed counts from an engine thread', () => {
    expect(cleanDetail({ done: 4.7, total: 10, unit: ' order ', note: '' })).toEqual({ done: 4, total: 10, atMost: false, unit: 'order', note: null });
    expect(cleanDetail({ done: -1, unit: 'x' })).toBeNull();
    expect(cleanDetail({ done: 1 })).toBeNull();
    expect(cleanDetail(null)).toBeNull();
    expect(cleanDetail({ done: 2, total: Infinity, unit: 'step' })).toMatchObject({ total: null });
  });
});
