// Frequency-limited balanced truncation on the web path (issue 15): a recipe posted through the route
// handler (/api/reductions) as an engineer, run by a real worker process (scripts/worker.ts) on this file's
// own queues, registers a draft version whose recipe keeps the band and whose accuracy report states the
// measured errors inside and outside the band and no bound. The stored errors are checked against G and Gr
// evaluated here, independently of the engine (a complex solve of (jωI − A) x = B per frequency), and the
// in-band error against plain balanced truncation at the same order. Bad bands are refused with 400 naming
// the field, leaving no recipe, job or audit row; other roles and visitors are refused (403 / 401). A
// controller project's acceptance band (rad/s) is set by its engineer members only, checked like the
// recipe's band, and becomes the reduce page's starting band in the model's own time unit.
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('next-auth', async (importOriginal) => ({ ...(await importOriginal<typeof import('next-auth')>()), getServerSession: vi.fn() }));

import { getServerSession } from 'next-auth';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { getJob, type JobView } from '@/lib/jobs/jobs';
import { registerUpload } from '@/lib/source-models';
import type { SessionUser } from '@/lib/auth';
import type { AccuracyFiguresRecord } from '@/lib/engine-tasks/records';
import { POST as reductionRoute } from '@/app/api/reductions/route';
import { PATCH as projectRoute } from '@/app/api/projects/[project]/route';
import { createProject } from '@/lib/projects';
import { projectBandSeed } from '@/lib/reduced-models';
import { reduceModel } from '@/reduction/reduce';
import { fromRows } from '@/reduction/linalg/matrix';
import { makeUser, migrateTestDatabase } from './helpers';
import { rowsBy, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

const ROOT = path.resolve(__dirname, '..', '..');
const noParams = { params: Promise.resolve({}) };
let engineer: SessionUser;
const workers: ChildProcess[] = [];
const logs: string[] = [];

/**
 * A lightly damped structure (invented data): modes at 1, 4, 15 and 50 rad/s with damping ratio 0.02, each
 * block [[0, 1], [−ω², −2ζω]], one force input on every mode and one output summing the displacements. The
 * slow modes carry the largest Hankel singular values, so plain balanced truncation to 4 states keeps the 1
 * and 4 rad/s modes; balancing on the band [10, 60] rad/s should keep the 15 and 50 rad/s ones.
 */
const FREQS = [1, 4, 15, 50];
const ZETA = 0.02;
function structureRows(): { A: number[][]; B: number[][]; C: number[][]; D: number[][] } {
  const n = 2 * FREQS.length;
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const B = Array.from({ length: n }, () => [0]);
  const C = [new Array<number>(n).fill(0)];
  FREQS.forEach((w, k) => {
    const i = 2 * k;
    A[i][i + 1] = 1;
    A[i + 1][i] = -w * w;
    A[i + 1][i + 1] = -2 * ZETA * w;
    B[i + 1][0] = 1;
    C[0][i] = 1;
  });
  return { A, B, C, D: [[0]] };
}

type Complex = [number, number];
/** G(jω) of a single-input single-output model: C (jωI − A)⁻¹ B + D by Gaussian elimination with pivoting. */
function siso(m: { A: number[][]; B: number[][]; C: number[][]; D: number[][] }, w: number): Complex {
  const n = m.A.length;
  const M: Complex[][] = m.A.map((row, i) => row.map((a, j) => [-a, i === j ? w : 0] as Complex));
  const x: Complex[] = m.B.map((r) => [r[0], 0]);
  const div = (a: Complex, b: Complex): Complex => {
    const d = b[0] * b[0] + b[1] * b[1];
    return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
  };
  const mul = (a: Complex, b: Complex): Complex => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.hypot(...M[i][k]) > Math.hypot(...M[p][k])) p = i;
    [M[k], M[p]] = [M[p], M[k]];
    [x[k], x[p]] = [x[p], x[k]];
    for (let i = k + 1; i < n; i++) {
      const f = div(M[i][k], M[k][k]);
      for (let j = k; j < n; j++) {
        const t = mul(f, M[k][j]);
        M[i][j] = [M[i][j][0] - t[0], M[i][j][1] - t[1]];
      }
      const t = mul(f, x[k]);
      x[i] = [x[i][0] - t[0], x[i][1] - t[1]];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let s = x[k];
    for (let j = k + 1; j < n; j++) {
      const t = mul(M[k][j], x[j]);
      s = [s[0] - t[0], s[1] - t[1]];
    }
    x[k] = div(s, M[k][k]);
  }
  let y: Complex = [m.D[0][0], 0];
  for (let j = 0; j < n; j++) y = [y[0] + m.C[0][j] * x[j][0], y[1] + m.C[0][j] * x[j][1]];
  return y;
}

const errorAt = (full: Parameters<typeof siso>[0], reduced: Parameters<typeof siso>[0], w: number) => {
  const a = siso(full, w);
  const b = siso(reduced, w);
  return Math.hypot(a[0] - b[0], a[1] - b[1]);
};

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `fl${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'band-limited' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

function startWorker(): void {
  const child = spawn(path.join(ROOT, 'node_modules', '.bin', 'tsx'), [path.join(ROOT, 'scripts', 'worker.ts')], {
    cwd: ROOT,
    detached: true,
    env: { ...process.env, MODESHELF_LINALG_THREADS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout?.on('data', (b: Buffer) => logs.push(b.toString()));
  child.stderr?.on('data', (b: Buffer) => logs.push(b.toString()));
  workers.push(child);
}

afterEach(async () => {
  await Promise.all(
    workers.splice(0).map(
      (child) =>
        new Promise<void>((resolve) => {
          if (child.exitCode !== null || child.signalCode !== null) return resolve();
          child.once('exit', () => resolve());
          try {
            process.kill(-child.pid!, 'SIGTERM');
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

async function waitFor(jobId: string, timeoutMs = 150_000): Promise<JobView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const job = await getJob(jobId);
    if (job.status === 'succeeded' || job.status === 'failed') return job;
    if (Date.now() > deadline) throw new Error(`job ${jobId} is still ${job.status} (${job.stage}); worker log:\n${logs.join('').slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

const asUser = (id: string | null) => vi.mocked(getServerSession).mockResolvedValue(id ? ({ user: { id } } as never) : null);

function post(body: unknown): Promise<Response> {
  return reductionRoute(
    new Request('http://127.0.0.1/api/reductions', { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }),
    noParams,
  );
}

async function analysedStructure(): Promise<{ versionId: string }> {
  const upload = await registerUpload(
    uploadRequest({ name: uniqueName('Lightly damped structure') }, [{ field: 'model', name: 'structure.json', text: JSON.stringify({ ...structureRows(), timeBase: 's' }) }]),
    engineer,
  );
  const analysis = await waitFor(upload.job.id);
  expect(analysis.status).toBe('succeeded');
  return { versionId: upload.version.id };
}

describe('frequency-limited balanced truncation through /api/reductions', () => {
  it('registers a draft version whose report has the measured in-band and out-of-band errors and no bound', async () => {
    startWorker();
    const { versionId } = await analysedStructure();
    asUser(engineer.id);
    const band = { minFrequency: 10, maxFrequency: 60, unit: 'rad' };
    const response = await post({
      sourceVersionId: versionId,
      recipe: { method: 'frequency-limited', orderRule: 'order', order: 4, limitedBand: band },
      target: { kind: 'new', name: uniqueName('Band ROM'), description: 'the 10–60 rad/s band' },
    });
    expect(response.status).toBe(202);
    const { job: queued, recipeId } = (await response.json()) as { job: JobView; recipeId: string };
    const job = await waitFor(queued.id);
    expect(job.error).toBeNull();
    expect(job.status).toBe('succeeded');

    const recipe = await db()('recipes').where({ id: recipeId }).first();
    expect(recipe).toMatchObject({ method: 'frequency-limited', order: 4, tolerance: null, created_by: engineer.id });
    expect(recipe.options).toEqual({ band: { minFrequency: 10, maxFrequency: 60 }, enteredBand: band });

    const version = await db()('reduced_versions').where({ id: job.result!.reducedVersionId }).first();
    expect(version).toMatchObject({ status: 'draft', order: 4, recipe_id: recipeId, source_version_id: versionId });
    const reduced = version.matrices as { A: number[][]; B: number[][]; C: number[][]; D: number[][] };
    expect(reduced.A).toHaveLength(4);

    const report = await db()('accuracy_reports').where({ reduced_version_id: version.id }).first();
    const f = report.figures as AccuracyFiguresRecord;
    expect(f.method).toBe('frequency-limited');
    expect(f.errorBound).toBeNull();
    expect(f.errorBoundNote).toBe('no a-priori error bound for this method');
    expect(f.reducedOrderFigures.errorBound).toBeNull();
    expect(f.frequencyLimited).toBeTruthy();
    const fl = f.frequencyLimited!;
    expect(fl.band).toEqual({ minFrequency: 10, maxFrequency: 60 });
    expect(typeof fl.reducedStable).toBe('boolean');
    expect(f.reducedStable).toBe(fl.reducedStable);
    // The peaks lie where they are said to: inside [10, 60] (log grid end points, to rounding), and outside.
    const inBandAt = fl.inBandErrorFrequency!;
    const outAt = fl.outOfBandErrorFrequency!;
    expect(inBandAt).toBeGreaterThanOrEqual(10 * (1 - 1e-12));
    expect(inBandAt).toBeLessThanOrEqual(60 * (1 + 1e-12));
    expect(outAt < 10 * (1 - 1e-12) || outAt > 60 * (1 + 1e-12)).toBe(true);

    // The stored errors are those of the stored reduced model, evaluated here independently.
    const full = structureRows();
    expect(errorAt(full, reduced, fl.inBandErrorFrequency!)).toBeCloseTo(fl.inBandError, 6);
    expect(errorAt(full, reduced, fl.outOfBandErrorFrequency!)).toBeCloseTo(fl.outOfBandError, 6);
    // No frequency of a dense grid exceeds them by more than the engine's grid can miss near a resonance.
    const inside = Array.from({ length: 4001 }, (_, k) => 10 + (50 * k) / 4000);
    const outside = [
      ...Array.from({ length: 3000 }, (_, k) => 10 * 10 ** ((-3 * (k + 1)) / 3000)),
      ...Array.from({ length: 3000 }, (_, k) => 60 * 10 ** ((3 * (k + 1)) / 3000)),
    ];
    const maxInside = Math.max(...inside.map((w) => errorAt(full, reduced, w)));
    const maxOutside = Math.max(...outside.map((w) => errorAt(full, reduced, w)));
    expect(fl.inBandError).toBeLessThanOrEqual(maxInside * (1 + 1e-9));
    expect(fl.inBandError).toBeGreaterThanOrEqual(0.5 * maxInside);
    expect(fl.outOfBandError).toBeLessThanOrEqual(maxOutside * (1 + 1e-9));
    expect(fl.outOfBandError).toBeGreaterThanOrEqual(0.5 * maxOutside);

    // What the method is for: inside the band it beats plain balanced truncation at the same order, which
    // spends its states on the slow modes outside the band.
    const plain = reduceModel(
      { A: fromRows(full.A), B: fromRows(full.B), C: fromRows(full.C), D: fromRows(full.D) },
      { method: 'balanced', order: 4 },
    ).model;
    const plainRows = {
      A: Array.from({ length: 4 }, (_, i) => Array.from(plain.A.data.subarray(i * 4, i * 4 + 4))),
      B: Array.from({ length: 4 }, (_, i) => [plain.B.data[i]]),
      C: [Array.from(plain.C.data)],
      D: [[plain.D.data[0]]],
    };
    const plainInside = Math.max(...inside.map((w) => errorAt(full, plainRows, w)));
    expect(maxInside).toBeLessThan(0.5 * plainInside);

    // The curves the comparison page draws include the band's edge.
    expect(report.curves.frequency.frequencies).toContain(10);
    expect(report.curves.frequency.frequencies).toContain(60);
    expect(report.acceptance_passed).toBeNull();
  });

  it('refuses bad bands and a tolerance rule with 400 naming the field, storing nothing', async () => {
    startWorker();
    const { versionId } = await analysedStructure();
    asUser(engineer.id);
    const before = await rowsBy(engineer.id);
    const cases: [Record<string, unknown>, string][] = [
      [{ method: 'frequency-limited', orderRule: 'order', order: 4, limitedBand: { minFrequency: 8, maxFrequency: 2 } }, 'recipe.limitedBand.maxFrequency'],
      [{ method: 'frequency-limited', orderRule: 'order', order: 4, limitedBand: { minFrequency: -1, maxFrequency: 2 } }, 'recipe.limitedBand.minFrequency'],
      [{ method: 'frequency-limited', orderRule: 'order', order: 4 }, 'recipe.limitedBand'],
      [{ method: 'frequency-limited', orderRule: 'tolerance', tolerance: 0.01, limitedBand: { minFrequency: 0, maxFrequency: 2 } }, 'recipe.orderRule'],
      [{ method: 'frequency-limited', orderRule: 'order', order: 9, limitedBand: { minFrequency: 0, maxFrequency: 2 } }, 'recipe.order'],
    ];
    for (const [recipe, field] of cases) {
      const response = await post({ sourceVersionId: versionId, recipe, target: { kind: 'new', name: uniqueName('Refused') } });
      expect(response.status, JSON.stringify(recipe)).toBe(400);
      const body = (await response.json()) as { error: { field: string; message: string } };
      expect(body.error.field).toBe(field);
      expect(body.error.message.length).toBeGreaterThan(10);
    }
    // A band in Hz for a model whose time unit has no known length cannot be converted.
    const odd = await registerUpload(
      uploadRequest({ name: uniqueName('Odd time unit'), timeBase: 'sample' }, [{ field: 'model', name: 'odd.json', text: JSON.stringify(structureRows()) }]),
      engineer,
    );
    expect((await waitFor(odd.job.id)).status).toBe('succeeded');
    const afterUpload = await rowsBy(engineer.id);
    const hz = await post({
      sourceVersionId: odd.version.id,
      recipe: { method: 'frequency-limited', orderRule: 'order', order: 4, limitedBand: { minFrequency: 0, maxFrequency: 2, unit: 'hz' } },
      target: { kind: 'new', name: uniqueName('Refused') },
    });
    expect(hz.status).toBe(400);
    expect(((await hz.json()) as { error: { field: string } }).error.field).toBe('recipe.limitedBand.unit');
    expect(await rowsBy(engineer.id)).toEqual(afterUpload);
    expect(afterUpload.recipes).toBe(before.recipes);
  });

  it('refuses the recipe from a viewer and a reviewer (403) and a visitor (401), storing no recipe', async () => {
    const recipe = { method: 'frequency-limited', orderRule: 'order', order: 4, limitedBand: { minFrequency: 0, maxFrequency: 8 } };
    for (const role of ['viewer', 'reviewer'] as const) { // admins are made only by people.test.ts
      const person = await makeUser({ role, label: `fl-${role}` });
      asUser(person.id);
      const response = await post({ sourceVersionId: '00000000-0000-4000-8000-000000000000', recipe, target: { kind: 'new', name: 'x' } });
      expect(response.status).toBe(403);
      expect((await rowsBy(person.id)).recipes).toBe(0);
    }
    asUser(null);
    expect((await post({ sourceVersionId: '00000000-0000-4000-8000-000000000000', recipe, target: { kind: 'new', name: 'x' } })).status).toBe(401);
  });
});

describe('a controller project\'s acceptance band, the reduce page\'s starting band', () => {
  const patch = (slug: string, body: unknown) =>
    projectRoute(new Request(`http://127.0.0.1/api/projects/${slug}`, { method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }), {
      params: Promise.resolve({ project: slug }),
    });

  it('is set by an engineer member, refused with the field named when bad, and refused to others', async () => {
    const project = await createProject({ name: uniqueName('Band controller'), slug: `band-${Date.now().toString(36)}` }, engineer);
    asUser(engineer.id);
    for (const [band, field] of [
      [{ minFrequency: 60, maxFrequency: 10 }, 'acceptanceBand.maxFrequency'],
      [{ minFrequency: -1, maxFrequency: 10 }, 'acceptanceBand.minFrequency'],
      [{ minFrequency: 0, maxFrequency: 10, maxError: 0 }, 'acceptanceBand.maxError'],
    ] as const) {
      const response = await patch(project.slug, { acceptanceBand: band });
      expect(response.status).toBe(400);
      expect(((await response.json()) as { error: { field: string } }).error.field).toBe(field);
    }
    expect((await db()('controller_projects').where({ id: project.id }).first()).acceptance_max_frequency).toBeNull();

    // An engineer who is not a member, and a viewer, cannot set it.
    const outsider = await makeUser({ role: 'engineer', label: 'band-outsider' });
    asUser(outsider.id);
    expect((await patch(project.slug, { acceptanceBand: { minFrequency: 0, maxFrequency: 5 } })).status).toBe(403);
    const viewer = await makeUser({ role: 'viewer', label: 'band-viewer' });
    asUser(viewer.id);
    expect((await patch(project.slug, { acceptanceBand: { minFrequency: 0, maxFrequency: 5 } })).status).toBe(403);
    expect((await db()('controller_projects').where({ id: project.id }).first()).acceptance_max_frequency).toBeNull();

    asUser(engineer.id);
    const ok = await patch(project.slug, { acceptanceBand: { minFrequency: 10, maxFrequency: 60, maxError: 0.05 } });
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { project: { acceptanceBand: unknown } }).project.acceptanceBand).toEqual({ minFrequency: 10, maxFrequency: 60, maxError: 0.05 });

    // The starting band: rad/s as is for a model in seconds; ×0.001 for one in milliseconds (rad/ms);
    // none for a time unit of unknown length, an unknown project, or a project without a band.
    expect(await projectBandSeed(project.slug, 's')).toEqual({ projectName: project.name, projectSlug: project.slug, minFrequency: 10, maxFrequency: 60, maxError: 0.05 });
    const ms = await projectBandSeed(project.slug, 'ms');
    expect(ms!.minFrequency).toBeCloseTo(0.01, 15);
    expect(ms!.maxFrequency).toBeCloseTo(0.06, 15);
    expect(await projectBandSeed(project.slug, 'sample')).toBeNull();
    expect(await projectBandSeed('no-such-project-here', 's')).toBeNull();
    expect((await patch(project.slug, { acceptanceBand: null })).status).toBe(200);
    expect(await projectBandSeed(project.slug, 's')).toBeNull();
  });
});
