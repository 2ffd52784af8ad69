// Stopping an engine task in its worker thread (lib/engine-tasks/run-task.ts, thread.ts): asked to stop, a
// task ends at its next progress report ("at a check"); one that does not answer within the grace period
// is terminated. Either way the result rejects with TaskStopped and nothing is returned. Also: the
// analysis reports its order loop's counts with its progress. Runs the real engine on the kiln wall
// (tests/integration/fixtures/model-uploads.ts) from files on this machine; no database.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { startEngineTask, TaskStopped } from '@/lib/engine-tasks/run-task';
import type { ProgressDetail } from '@/lib/engine-tasks/progress';
import type { ModelFile } from '@/lib/engine-tasks/model-files';
import { kilnWallFiles } from '../../integration/fixtures/model-uploads';

const dirs: string[] = [];
afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })));

function wall(layers: number, zones: number): ModelFile[] {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'modeshelf-stop-'));
  dirs.push(dir);
  return kilnWallFiles(layers, zones).map((f) => {
    const p = path.join(dir, f.name);
    writeFileSync(p, f.text);
    return { role: f.field as ModelFile['role'], name: f.name, path: p };
  });
}

describe('stopping an engine task', () => {
  it('ends at its next check when asked, within a long grace period', async () => {
    const files = wall(10, 12);
    let asked = false;
    const task = startEngineTask({ task: 'analysis', files, engineVersion: 'test' }, () => {
      if (asked) return;
      asked = true;
      // The first report ("Reading the model files") comes before the model is read; the next one throws.
      task.stop('the job was cancelled', 60_000);
    });
    const error = await task.result.then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).toBeInstanceOf(TaskStopped);
    expect((error as TaskStopped).how).toBe('at a check');
    expect((error as TaskStopped).reason).toBe('the job was cancelled');
  });

  it('is terminated when it does not reach a check within the grace period', async () => {
    const files = wall(20, 30); // 600 states: the analysis call runs far longer than a 0 ms grace
    const stages: string[] = [];
    const task = startEngineTask({ task: 'analysis', files, engineVersion: 'test' }, (stage) => {
      stages.push(stage);
      // The second report comes just before the long analysis call: the thread is inside it now.
      if (stages.length === 2) task.stop('the job was cancelled', 0);
    });
    const error = await task.result.then(
      () => null,
      (e: unknown) => e,
    );
    expect(stages[1]).toMatch(/^Computing poles/);
    expect(error).toBeInstanceOf(TaskStopped);
    expect((error as TaskStopped).how).toBe('terminated');
  });

  it('reports the order loop with its counts while it runs', async () => {
    const files = wall(4, 5);
    const details: ProgressDetail[] = [];
    await startEngineTask({ task: 'analysis', files, engineVersion: 'test' }, (_stage, _f, detail) => {
      if (detail) details.push(detail);
    }).result;
    const orders = details.filter((d) => d.unit === 'order');
    expect(orders.length).toBeGreaterThan(2);
    for (const d of orders) {
      expect(d.done).toBeGreaterThanOrEqual(1);
      expect(d.done).toBeLessThanOrEqual(d.total!);
    }
    // The balanced loop counts up to its total.
    expect(orders.some((d) => d.done === d.total)).toBe(true);
  });
});
