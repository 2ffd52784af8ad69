// Uploading source models against the real PostgreSQL and a real uploads folder (issue 5, "Upload and
// versions"): every accepted format is registered with its analysis job and its files stored by content;
// every refused upload gives its message, names its field, and leaves no row and no file behind; viewers
// (and every role but engineer) are refused by the route itself.
//
// Expected values come from the inputs, not from the code under test: sizes by counting the matrices,
// digests by node:crypto over the same bytes (FIPS 180-4 SHA-256), the version checksum of several files as
// the migration defines it (SHA-256 of "role:digest" lines).
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('next-auth', async (importOriginal) => ({ ...(await importOriginal<typeof import('next-auth')>()), getServerSession: vi.fn() }));

import { getServerSession } from 'next-auth';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { listSourceModels, registerUpload } from '@/lib/source-models';
import { storagePath } from '@/lib/uploads/store';
import type { SessionUser } from '@/lib/auth';
import { POST as uploadRoute } from '@/app/api/uploads/source-models/route';
import { POST as reductionRoute } from '@/app/api/reductions/route';
import { makeUser, migrateTestDatabase } from './helpers';
import {
  SMALL,
  csv,
  firstOrderJson,
  listFiles,
  matrixMarketArray,
  rowsBy,
  secondOrderJson,
  sha256,
  tempUploadsDir,
  uniqueName,
  uploadRequest,
  type UploadFile,
} from './fixtures/model-uploads';

let uploads = '';
let engineer: SessionUser;

beforeAll(async () => {
  uploads = tempUploadsDir();
  process.env.MODESHELF_UPLOADS_DIR = uploads;
  // This file's jobs go to queues of their own; no worker runs them here.
  process.env.MODESHELF_QUEUE_PREFIX = `t${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  const row = await makeUser({ role: 'engineer', label: 'uploader' });
  engineer = { id: row.id, email: row.email, name: row.name, role: 'engineer' };
});

afterAll(async () => {
  await closeQueue();
  await closeDb();
});

const matrixFiles = (m: typeof SMALL, ext: 'mtx' | 'csv'): UploadFile[] =>
  (['A', 'B', 'C', 'D'] as const).map((role) => ({
    field: role,
    name: `${role}.${ext}`,
    text: ext === 'csv' ? csv(m[role]) : matrixMarketArray(m[role]),
  }));

async function versionRow(id: string) {
  return db()('source_versions').where({ id }).first();
}

describe('uploading a source model', () => {
  it('registers a first-order JSON model, stores the file by its SHA-256 and queues its analysis', async () => {
    const text = firstOrderJson();
    const name = uniqueName('Lag and resonance');
    const result = await registerUpload(uploadRequest({ name, description: 'two modes', tags: 'Thermal, demo, thermal' }, [{ field: 'model', name: 'lag.json', text }]), engineer);
    expect(result.version).toMatchObject({ number: 1, states: 3, inputs: 1, outputs: 1, checksum: sha256(text) });
    expect(result.job).toMatchObject({ kind: 'analysis', status: 'queued', subjectId: result.version.id });
    expect(result.url).toBe(`/source-models/${result.sourceModel.slug}/versions/1`);
    expect(result.sourceModel.tags).toEqual(['thermal', 'demo']);

    const row = await versionRow(result.version.id);
    expect(row).toMatchObject({ format: 'json', states: 3, nonzeros_a: '5' });
    const [file] = row.files;
    expect(file).toMatchObject({ role: 'model', name: 'lag.json', size: Buffer.byteLength(text), sha256: sha256(text) });
    expect(file.storageKey).toBe(`sha256/${sha256(text).slice(0, 2)}/${sha256(text)}`);
    expect(readFileSync(storagePath(file.storageKey), 'utf8')).toBe(text);
    expect(listFiles(path.join(uploads, 'tmp'))).toEqual([]);

    const job = await db()('jobs').where({ id: result.job.id }).first();
    expect(job).toMatchObject({ status: 'queued', payload: { sourceVersionId: result.version.id }, created_by: engineer.id });
    // Handed to the queue after the commit, under the job's own id.
    expect(job.queue_job_id).toBe(job.id);
    const audit = await db()('audit_events').where({ subject_type: 'source_version', subject_id: result.version.id }).first();
    expect(audit).toMatchObject({ action: 'source_model.created', actor_id: engineer.id });
  });

  it('keeps the labels and the time base a JSON model gives', async () => {
    const text = firstOrderJson({ labels: { inputs: ['burner'], outputs: ['flue temperature'] }, timeBase: 'ms' });
    const result = await registerUpload(uploadRequest({ name: uniqueName('Labelled lag') }, [{ field: 'model', name: 'labelled.json', text }]), engineer);
    // The form leaves the time base empty, so the file's own is kept.
    expect(result.sourceModel.timeBase).toBe('ms');
  });

  it('registers a second-order JSON model as its first-order form [q; q̇] (2 DOF → 4 states)', async () => {
    const text = secondOrderJson();
    const result = await registerUpload(uploadRequest({ name: uniqueName('Two masses') }, [{ field: 'model', name: 'masses.json', text }]), engineer);
    expect(result.version).toMatchObject({ states: 4, inputs: 1, outputs: 1 });
    expect((await versionRow(result.version.id)).format).toBe('second-order');
  });

  it('registers Matrix Market A, B, C, D files with the checksum of their "role:digest" lines', async () => {
    const files = matrixFiles(SMALL, 'mtx');
    const result = await registerUpload(uploadRequest({ name: uniqueName('Small MM') }, files), engineer);
    const lines = files.map((f) => `${f.field}:${sha256(f.text)}`).join('\n');
    expect(result.version.checksum).toBe(sha256(lines));
    const row = await versionRow(result.version.id);
    expect(row.format).toBe('matrix-market');
    expect(row.files.map((f: { role: string }) => f.role)).toEqual(['A', 'B', 'C', 'D']);
    for (const f of row.files) expect(existsSync(storagePath(f.storageKey))).toBe(true);
  });

  it('registers CSV files A, B, C with D left out (zeros)', async () => {
    const files = matrixFiles(SMALL, 'csv').filter((f) => f.field !== 'D');
    const result = await registerUpload(uploadRequest({ name: uniqueName('Small CSV'), timeBase: 'ms' }, files), engineer);
    expect(result.version).toMatchObject({ states: 3, inputs: 1, outputs: 1 });
    expect((await versionRow(result.version.id)).format).toBe('csv');
    expect(result.sourceModel.timeBase).toBe('ms');
  });

  it('numbers a new version of an existing model v2, and lists the model with its latest version', async () => {
    const name = uniqueName('Versioned');
    const first = await registerUpload(uploadRequest({ name }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), engineer);
    const changed = firstOrderJson({ D: [[0.5]] });
    const second = await registerUpload(
      uploadRequest({ sourceModelId: first.sourceModel.id, notes: 'feedthrough added' }, [{ field: 'model', name: 'm.json', text: changed }]),
      engineer,
    );
    expect(second.version.number).toBe(2);
    expect(second.sourceModel.id).toBe(first.sourceModel.id);
    const listed = await listSourceModels({ q: name, stable: '', sort: 'name', dir: 'asc', page: 0, pageSize: 20 });
    expect(listed.total).toBe(1);
    expect(listed.rows[0]).toMatchObject({ name, latestVersion: 2, states: 3, uploadedBy: engineer.name, stiffnessRatio: null });
  });
});

describe('a refused upload gives its message, names its field, and leaves no row and no file', () => {
  const bad = (field: string, name: string, text: string): UploadFile => ({ field, name, text });
  const okMm = (role: 'A' | 'B' | 'C') => bad(role, `${role}.mtx`, matrixMarketArray(SMALL[role]));
  const cases: { label: string; files: UploadFile[]; fields?: Record<string, string>; status: number; code: RegExp; field: string; message: RegExp }[] = [
    {
      label: 'wrong shapes: B has 4 rows for a 3-state A',
      files: [okMm('A'), bad('B', 'B.mtx', matrixMarketArray([[1], [0], [1], [2]])), okMm('C')],
      status: 422,
      code: /dimension_mismatch/,
      field: 'B',
      message: /B has 4 rows but A is 3×3/,
    },
    {
      label: 'NaN in a JSON model',
      files: [bad('model', 'nan.json', '{"A": [[-1.0, 0.0], [0.0, NaN]], "B": [[1.0], [1.0]], "C": [[1.0, 1.0]]}')],
      status: 422,
      code: /non_finite/,
      field: 'model',
      message: /nan\.json: A row 2, column 2 is not finite/,
    },
    {
      label: 'a non-numeric cell in a CSV matrix',
      files: [bad('A', 'A.csv', '-1,0,0\n0,-2,abc\n0,0,-3\n'), bad('B', 'B.csv', csv(SMALL.B)), bad('C', 'C.csv', csv(SMALL.C))],
      status: 422,
      code: /non_numeric/,
      field: 'A',
      message: /A\.csv: A row 2, column 3 is not a number: "abc"/,
    },
    {
      label: 'a truncated Matrix Market file',
      files: [bad('A', 'A.mtx', '%%MatrixMarket matrix coordinate real general\n3 3 4\n1 1 -1.0\n2 2 -2.0\n3 3 -3.0\n'), okMm('B'), okMm('C')],
      status: 422,
      code: /truncated_file/,
      field: 'A',
      message: /A is truncated: 4 entries declared, 3 found/,
    },
    {
      label: 'the C file missing',
      files: [okMm('A'), okMm('B')],
      status: 400,
      code: /missing_file/,
      field: 'C',
      message: /C matrix file is missing/,
    },
    {
      // Labels belong under "labels" and the unit of time is "timeBase": any other key (one misplaced, misspelt or
      // from an earlier shape of the format) is refused with the key and the shape named, never dropped silently.
      label: 'a JSON model with a key the format does not define',
      files: [bad('model', 'placed.json', firstOrderJson({ outputs: ['flame temperature'] }))],
      status: 422,
      code: /invalid_model_unknown_field/,
      field: 'model',
      message: /placed\.json: "outputs" is not a field of a first-order model file.*"labels": \{"inputs": \[\.\.\.\], "outputs": \[\.\.\.\], "states": \[\.\.\.\]\}.*"timeBase"/,
    },
    {
      label: 'a model file that is not JSON',
      files: [bad('model', 'model.txt', firstOrderJson())],
      status: 422,
      code: /unsupported_format/,
      field: 'model',
      message: /must be JSON/,
    },
    {
      label: 'no name for a new model',
      files: [bad('model', 'm.json', firstOrderJson())],
      fields: { name: '   ' },
      status: 400,
      code: /invalid_request/,
      field: 'name',
      message: /Name is required/,
    },
  ];

  it.each(cases.map((c) => [c.label, c] as const))('%s', async (_label, c) => {
    const before = await rowsBy(engineer.id);
    const filesBefore = listFiles(uploads);
    const attempt = registerUpload(uploadRequest(c.fields ?? { name: uniqueName('Refused') }, c.files), engineer);
    await expect(attempt).rejects.toMatchObject({ status: c.status, code: expect.stringMatching(c.code), field: c.field, message: expect.stringMatching(c.message) });
    expect(await rowsBy(engineer.id)).toEqual(before);
    expect(listFiles(uploads)).toEqual(filesBefore);
  });

  it('an oversized upload is cut off while streaming (413), naming the file being received', async () => {
    const previous = process.env.MODESHELF_MAX_UPLOAD_BYTES;
    process.env.MODESHELF_MAX_UPLOAD_BYTES = '4096';
    try {
      const before = await rowsBy(engineer.id);
      const filesBefore = listFiles(uploads);
      const big = '%%MatrixMarket matrix array real general\n100 100\n' + '0.125\n'.repeat(10_000);
      const attempt = registerUpload(uploadRequest({ name: uniqueName('Too big') }, [bad('A', 'A.mtx', big), okMm('B'), okMm('C')]), engineer);
      await expect(attempt).rejects.toMatchObject({ status: 413, code: 'upload_too_large', field: 'A', message: expect.stringMatching(/larger than the limit of 4 KiB/) });
      expect(await rowsBy(engineer.id)).toEqual(before);
      expect(listFiles(uploads)).toEqual(filesBefore);
    } finally {
      if (previous === undefined) delete process.env.MODESHELF_MAX_UPLOAD_BYTES;
      else process.env.MODESHELF_MAX_UPLOAD_BYTES = previous;
    }
  });

  it('a duplicate of an existing version answers 409 with a link to it and adds nothing', async () => {
    const files = matrixFiles(SMALL, 'csv');
    const first = await registerUpload(uploadRequest({ name: uniqueName('Duplicate') }, files), engineer);
    const before = await rowsBy(engineer.id);
    const filesBefore = listFiles(uploads);
    const again = registerUpload(uploadRequest({ sourceModelId: first.sourceModel.id }, files), engineer);
    await expect(again).rejects.toMatchObject({
      status: 409,
      code: 'duplicate_version',
      field: 'A',
      link: `/source-models/${first.sourceModel.slug}/versions/1`,
      message: expect.stringMatching(/already version v1/),
    });
    expect(await rowsBy(engineer.id)).toEqual(before);
    expect(listFiles(uploads)).toEqual(filesBefore);
  });
});

describe('who may upload and run recipes (the route handlers themselves)', () => {
  const asUser = (id: string | null) => vi.mocked(getServerSession).mockResolvedValue(id ? ({ user: { id } } as never) : null);
  const noParams = { params: Promise.resolve({}) };

  it.each(['viewer', 'reviewer', 'admin'] as const)('refuses an upload from the %s role with 403, adding nothing', async (role) => {
    const person = await makeUser({ role, label: `upload-${role}` });
    asUser(person.id);
    const filesBefore = listFiles(uploads);
    const response = await uploadRoute(uploadRequest({ name: uniqueName('Forbidden') }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), noParams);
    expect(response.status).toBe(403);
    expect(await response.json()).toMatchObject({ error: { code: 'forbidden', message: expect.stringContaining('needs the engineer role') } });
    expect(await rowsBy(person.id)).toMatchObject({ source_models: 0, source_versions: 0, jobs: 0 });
    expect(listFiles(uploads)).toEqual(filesBefore);
  });

  it('refuses a visitor without a session with 401', async () => {
    asUser(null);
    const response = await uploadRoute(uploadRequest({ name: 'x' }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), noParams);
    expect(response.status).toBe(401);
  });

  it('refuses a recipe from a viewer with 403 and registers no recipe', async () => {
    const viewer = await makeUser({ role: 'viewer', label: 'recipe-viewer' });
    asUser(viewer.id);
    const request = new Request('http://127.0.0.1/api/reductions', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ sourceVersionId: '00000000-0000-4000-8000-000000000000', recipe: { method: 'balanced', orderRule: 'order', order: 2 }, target: { kind: 'new', name: 'x' } }),
    });
    const response = await reductionRoute(request, noParams);
    expect(response.status).toBe(403);
    expect((await rowsBy(viewer.id)).recipes).toBe(0);
  });

  it('lets an engineer upload through the route (202 with the version and its job)', async () => {
    asUser(engineer.id);
    const response = await uploadRoute(uploadRequest({ name: uniqueName('Via route') }, [{ field: 'model', name: 'm.json', text: firstOrderJson({ D: [[0.25]] }) }]), noParams);
    expect(response.status).toBe(202);
    const body = await response.json();
    expect(body).toMatchObject({ version: { number: 1, states: 3 }, job: { kind: 'analysis', status: 'queued' } });
  });
});
