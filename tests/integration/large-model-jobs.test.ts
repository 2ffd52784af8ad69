// A large model through the queue and a real worker process (scripts/worker.ts) on this file's own queues:
// the demo's hearth plate at 36 × 36 nodes with E (1296 states) is uploaded, analysed as a large-class job
// on the sparse path (its analysis marked sparse, with what is estimated), refused recipes the large-model
// path does not offer (400 naming the field, nothing written), and reduced by low-rank balanced truncation
// and by IRKA, each registering a draft version whose accuracy report is marked sparse.
//
// References: the balanced-truncation bound ‖G − Gr‖∞ ≤ 2 Σ_{i>r} σᵢ (Glover, Int. J. Control 39(6), 1984;
// Enns 1984), over the Hankel singular values the analysis resolved; the sampled error is a lower bound of
// ‖G − Gr‖∞, so it must lie below that bound.
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { getJob, type JobView } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import { requestReduction } from '@/lib/reduced-models';
import type { SessionUser } from '@/lib/auth';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { makeUser, migrateTestDatabase } from './helpers';
import { rowsBy, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

const ROOT = path.resolve(__dirname, '..', '..');
let engineer: SessionUser;
const workers: ChildProcess[] = [];
const logs: string[] = [];

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `l${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'large-jobs' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

function startWorker(): ChildProcess {
  const child = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), [path.join(ROOT, 'scripts', 'worker.ts')], {
    cwd: ROOT,
    detached: true,
    env: { ...process.env, MODESHELF_LINALG_THREADS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (b: Buffer) => logs.push(b.toString()));
  child.stderr?.on('data', (b: Buffer) => logs.push(b.toString()));
  workers.push(child);
  return child;
}

afterEach(async () => {
  await Promise.all(
    workers.splice(0).map(
      (w) =>
        new Promise<void>((resolve) => {
          if (w.exitCode !== null || w.signalCode !== null) return resolve();
          w.once('exit', () => resolve());
          try {
            process.kill(-w.pid!, 'SIGTERM');
          } catch {
            resolve();
          }
        }),
    ),
  );
});

afterAll(async () => {
  await closeQueue();
  await closeDb();
});

async function waitFor(jobId: string, timeoutMs = 120_000, onPoll?: (j: JobView) => void): Promise<JobView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(jobId);
    onPoll?.(job);
    if (job.status === 'succeeded' || job.status === 'failed') return job;
    if (Date.now() > deadline) throw new Error(`job ${jobId} is still ${job.status} (${job.stage}); worker log:\n${logs.join('').slice(-2000)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('a large model through the queue', () => {
  it('is analysed on the sparse path as a large job, refuses what that path does not offer, and is reduced at scale', async () => {
    startWorker();
    const plate = hearthPlate(36);
    const upload = await registerUpload(
      uploadRequest(
        { name: uniqueName('Hearth plate 36') },
        (['A', 'B', 'C', 'E'] as const).map((role) => ({ field: role, name: `${role}.mtx`, text: plate[role] })),
      ),
      engineer,
    );
    expect(upload.job.workerClass).toBe('large');
    const details = new Set<string>();
    const analysed = await waitFor(upload.job.id, 120_000, (j) => j.detail && details.add(j.detail.unit));
    expect(analysed.status, analysed.error ?? '').toBe('succeeded');
    const record = (await db()('analyses').where({ source_version_id: upload.version.id }).first()).result as AnalysisRecord;
    expect(record.path).toBe('sparse');
    expect(record.states).toBe(1296);
    expect(record.sparse!.estimated).toContain('hankelSingularValues');
    expect(record.zeroFrequencyGain.defined).toBe(true);
    const hsv = record.hankelSingularValues;
    expect(hsv.length).toBeGreaterThan(12);

    // Refused before anything is written: the tolerance rule, a frequency-limited order not below the resolved
    // values (it starts from their balanced model), an order past the resolved values.
    const before = await rowsBy(engineer.id);
    const target = { kind: 'new' as const, name: uniqueName('Plate ROM'), description: '' };
    const refuse = async (recipe: Parameters<typeof requestReduction>[0]['recipe'], field: string) => {
      await expect(requestReduction({ sourceVersionId: upload.version.id, recipe, target }, engineer)).rejects.toMatchObject({ status: 400, field });
    };
    await refuse({ method: 'balanced', orderRule: 'tolerance', tolerance: 1e-3, modalSelection: 'dominance' }, 'recipe.orderRule');
    await refuse(
      { method: 'frequency-limited', orderRule: 'order', order: hsv.length, modalSelection: 'dominance', limitedBand: { minFrequency: 0, maxFrequency: 1, unit: 'rad' } },
      'recipe.order',
    );
    await refuse({ method: 'balanced', orderRule: 'order', order: hsv.length + 1, modalSelection: 'dominance' }, 'recipe.order');
    expect(await rowsBy(engineer.id)).toEqual(before);

    const balanced = await requestReduction({ sourceVersionId: upload.version.id, recipe: { method: 'balanced', orderRule: 'order', order: 12, modalSelection: 'dominance' }, target }, engineer);
    const reduced = await waitFor(balanced.job.id);
    expect(reduced.status, reduced.error ?? '').toBe('succeeded');
    const version = await db()('reduced_versions').where({ id: reduced.result!.reducedVersionId }).first();
    expect(version.order).toBe(12);
    const report = await db()('accuracy_reports').where({ reduced_version_id: version.id }).first();
    expect(report.figures.path).toBe('sparse');
    const bound = 2 * hsv.slice(12).reduce((s, x) => s + x, 0);
    expect(report.figures.errorBound).toBeCloseTo(bound, 12);
    expect(report.figures.hInfinityError).toBeLessThanOrEqual(bound * (1 + 1e-6));
    expect(report.curves.step.full).toHaveLength(2); // the full model's step responses by sparse time integration
    expect(report.figures.costRows).toHaveLength(1);

    const irka = await requestReduction(
      { sourceVersionId: upload.version.id, recipe: { method: 'irka', orderRule: 'order', order: 6, modalSelection: 'dominance' }, target: { kind: 'existing', reducedModelId: version.reduced_model_id } },
      engineer,
    );
    const second = await waitFor(irka.job.id);
    expect(second.status, second.error ?? '').toBe('succeeded');
    const v2 = await db()('reduced_versions').where({ id: second.result!.reducedVersionId }).first();
    expect(v2).toMatchObject({ number: 2, order: 6 });
    expect((await db()('recipes').where({ id: irka.recipeId }).first()).method).toBe('irka');

    // Frequency-limited balanced truncation at scale: no bound, the band errors measured against the full model.
    const limited = await requestReduction(
      {
        sourceVersionId: upload.version.id,
        recipe: { method: 'frequency-limited', orderRule: 'order', order: 4, modalSelection: 'dominance', limitedBand: { minFrequency: 0, maxFrequency: 50, unit: 'rad' } },
        target: { kind: 'existing', reducedModelId: version.reduced_model_id },
      },
      engineer,
    );
    const third = await waitFor(limited.job.id);
    expect(third.status, third.error ?? '').toBe('succeeded');
    const v3 = await db()('reduced_versions').where({ id: third.result!.reducedVersionId }).first();
    expect(v3).toMatchObject({ number: 3, order: 4 });
    const limitedReport = (await db()('accuracy_reports').where({ reduced_version_id: v3.id }).first()).figures;
    expect(limitedReport.errorBound).toBeNull();
    expect(limitedReport.frequencyLimited.band).toEqual({ minFrequency: 0, maxFrequency: 50 });
    expect(limitedReport.frequencyLimited.inBandError).toBeGreaterThan(0);
    expect(limitedReport.frequencyLimited.singularValues.length).toBeGreaterThan(4);
  });
});
