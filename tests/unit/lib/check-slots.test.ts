// The upload checks' concurrency limit (lib/engine-tasks/validate-process.ts): never more checks at once
// than MODESHELF_CHECK_CONCURRENCY, every waiting check runs in arrival order, and a failing check frees its slot.
import { afterEach, describe, expect, it } from 'vitest';
import { inSlot } from '@/lib/engine-tasks/validate-process';

afterEach(() => {
  delete process.env.MODESHELF_CHECK_CONCURRENCY;
});

describe('upload check slots', () => {
  it('runs at most the configured number at once, the rest in arrival order', async () => {
    process.env.MODESHELF_CHECK_CONCURRENCY = '2';
    let active = 0;
    let peak = 0;
    const started: number[] = [];
    const work = (k: number) => () =>
      new Promise<number>((resolve) => {
        started.push(k);
        active++;
        peak = Math.max(peak, active);
        setTimeout(() => {
          active--;
          resolve(k);
        }, 20);
      });
    const results = await Promise.all([0, 1, 2, 3, 4, 5].map((k) => inSlot(work(k))));
    expect(results).toEqual([0, 1, 2, 3, 4, 5]);
    expect(peak).toBe(2);
    expect(started).toEqual([0, 1, 2, 3, 4, 5]);
  });

  it('frees the slot of a check that fails', async () => {
    process.env.MODESHELF_CHECK_CONCURRENCY = '1';
    await expect(inSlot(() => Promise.reject(new Error('boom')))).rejects.toThrow('boom');
    await expect(inSlot(() => Promise.resolve('next'))).resolves.toBe('next');
  });
});
