// Large models through the upload route (issue 14, "Large models end to end"): Matrix Market A, B, C with
// E, a second-order model's M, D, K with B and C, or the same files in one zip archive; a model above the
// engine's crossover (reduction/sparse/path.ts) or with E is checked on the sparse path, its analysis job
// queued in the large class. Refusals answer 4xx naming the field at fault and leave no row and no file.
// The models are the demo's hearth plate (db/seeds/demo/plate.ts) at small sizes and a spring chain; what
// each test expects is counted from the files it sends (states = side², nonzeros by counting lines).
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('next-auth', async (importOriginal) => ({ ...(await importOriginal<typeof import('next-auth')>()), getServerSession: vi.fn() }));

import JSZip from 'jszip';
import { getServerSession } from 'next-auth';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { POST as uploadRoute } from '@/app/api/uploads/source-models/route';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { makeUser, migrateTestDatabase } from './helpers';
import { listFiles, rowsBy, sha256, tempUploadsDir, uniqueName, uploadRequest, type UploadFile } from './fixtures/model-uploads';

let uploads = '';
let engineerId = '';
const noParams = { params: Promise.resolve({}) };

beforeAll(async () => {
  uploads = tempUploadsDir();
  process.env.MODESHELF_UPLOADS_DIR = uploads;
  process.env.MODESHELF_QUEUE_PREFIX = `t${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  engineerId = (await makeUser({ role: 'engineer', label: 'large-uploads' })).id;
  vi.mocked(getServerSession).mockResolvedValue({ user: { id: engineerId } } as never);
});

afterAll(async () => {
  delete process.env.MODESHELF_SPARSE_CROSSOVER;
  await closeQueue();
  await closeDb();
});

function plateFiles(side: number, roles: readonly ('A' | 'B' | 'C' | 'E')[] = ['A', 'B', 'C', 'E']): UploadFile[] {
  const p = hearthPlate(side);
  return roles.map((role) => ({ field: role, name: `${role}.mtx`, text: p[role] }));
}

/** Entries declared on a coordinate file's size line. */
const declaredEntries = (text: string) => Number(text.split('\n').find((l) => l.trim() !== '' && !l.startsWith('%'))!.trim().split(/\s+/)[2]);

/** A diagonal coordinate matrix of size n (ones). */
const diagonal = (n: number) => `%%MatrixMarket matrix coordinate real general\n${n} ${n} ${n}\n${Array.from({ length: n }, (_, i) => `${i + 1} ${i + 1} 1`).join('\n')}\n`;

/** A chain of q unit masses on unit springs, fixed at one end: M, D = 0.02 K, K as coordinate files. */
function chainFiles(q: number, outputColumns = q): UploadFile[] {
  const tri = (d: number, o: number) => {
    const lines: string[] = [];
    for (let i = 1; i <= q; i++) {
      lines.push(`${i} ${i} ${i === q ? d / 2 : d}`);
      if (i < q && o !== 0) lines.push(`${i + 1} ${i} ${o}`);
    }
    return `%%MatrixMarket matrix coordinate real symmetric\n${q} ${q} ${lines.length}\n${lines.join('\n')}\n`;
  };
  const force = `%%MatrixMarket matrix coordinate real general\n${q} 1 1\n${q} 1 1\n`;
  const output = `%%MatrixMarket matrix coordinate real general\n1 ${outputColumns} 1\n1 ${Math.min(q, outputColumns)} 1\n`;
  return [
    { field: 'mass', name: 'M.mtx', text: tri(1, 0) },
    { field: 'damping', name: 'D.mtx', text: tri(0.04, -0.02) },
    { field: 'stiffness', name: 'K.mtx', text: tri(2, -1) },
    { field: 'B', name: 'B.mtx', text: force },
    { field: 'C', name: 'C.mtx', text: output },
  ];
}

async function zipOf(members: { name: string; text: string }[]): Promise<Buffer> {
  const zip = new JSZip();
  for (const m of members) zip.file(m.name, m.text);
  return zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
}

/** The version checksum of several files, written out from its definition (lib/source-models.ts): SHA-256 of "role:digest" lines in role order. */
function expectedChecksum(files: UploadFile[]): string {
  const order = ['model', 'A', 'B', 'C', 'D', 'E', 'mass', 'damping', 'stiffness'];
  const lines = [...files].sort((a, b) => order.indexOf(a.field) - order.indexOf(b.field)).map((f) => `${f.field}:${sha256(f.text)}`);
  return sha256(lines.join('\n'));
}

async function refused(files: UploadFile[], status: number, code: string, field: string, message?: RegExp) {
  const before = await rowsBy(engineerId);
  const filesBefore = listFiles(uploads);
  const response = await uploadRoute(uploadRequest({ name: uniqueName('Refused large') }, files), noParams);
  const body = (await response.json()) as { error: { code: string; field: string; message: string } };
  expect({ status: response.status, code: body.error.code, field: body.error.field }).toEqual({ status, code, field });
  if (message) expect(body.error.message).toMatch(message);
  expect(await rowsBy(engineerId)).toEqual(before);
  expect(listFiles(uploads)).toEqual(filesBefore);
  return body.error;
}

describe('large models through the upload route', () => {
  it('a 33 × 33 hearth plate with E (1089 states, above the crossover of 1000) is accepted on the sparse path and its analysis queued as a large job', async () => {
    const files = plateFiles(33);
    const response = await uploadRoute(uploadRequest({ name: uniqueName('Hearth plate') }, files), noParams);
    expect(response.status).toBe(202);
    const body = (await response.json()) as { version: { id: string; states: number; inputs: number; outputs: number; checksum: string }; job: { id: string } };
    expect(body.version).toMatchObject({ states: 33 * 33, inputs: 2, outputs: 3, checksum: expectedChecksum(files) });
    const row = await db()('source_versions').where({ id: body.version.id }).first();
    // A stored "symmetric": each off-diagonal line stands for two entries.
    const aLines = declaredEntries(files[0].text as string);
    expect(Number(row.nonzeros_a)).toBe(2 * aLines - 33 * 33);
    expect(row.format).toBe('matrix-market');
    expect(row.files.map((f: { role: string }) => f.role)).toEqual(['A', 'B', 'C', 'E']);
    const job = await db()('jobs').where({ id: body.job.id }).first();
    expect(job.worker_class).toBe('large');
  });

  it('the same model as one zip archive is stored as the same files: the same checksum, and a duplicate of the version sent file by file', async () => {
    const files = plateFiles(20);
    const zip = await zipOf(files.map((f) => ({ name: `plate/${f.field}.mtx`, text: f.text as string })));
    const first = await uploadRoute(uploadRequest({ name: uniqueName('Plate, files') }, files), noParams);
    expect(first.status, JSON.stringify(await first.clone().json())).toBe(202);
    const one = (await first.json()) as { sourceModel: { id: string }; version: { checksum: string } };
    const zipped = await uploadRoute(uploadRequest({ name: uniqueName('Plate, zip') }, [{ field: 'archive', name: 'plate.zip', text: zip }]), noParams);
    expect(zipped.status).toBe(202);
    const two = (await zipped.json()) as { version: { id: string; checksum: string; states: number } };
    expect(two.version.checksum).toBe(one.version.checksum);
    expect(two.version.states).toBe(400);
    const stored = (await db()('source_versions').where({ id: two.version.id }).first()).files as { role: string; sha256: string; name: string }[];
    expect(stored.map((f) => [f.role, f.name, f.sha256])).toEqual(files.map((f) => [f.field, `${f.field}.mtx`, sha256(f.text)]));
    // Sent again as a version of the first model: recognised, not duplicated.
    const again = await uploadRoute(uploadRequest({ sourceModelId: one.sourceModel.id }, [{ field: 'archive', name: 'again.zip', text: zip }]), noParams);
    expect(again.status).toBe(409);
    expect(((await again.json()) as { error: { code: string; field: string } }).error).toMatchObject({ code: 'duplicate_version', field: 'archive' });
  });

  it('a second-order model M, D, K with B and C (60 degrees of freedom, crossover set to 100) becomes a 120-state descriptor model', async () => {
    process.env.MODESHELF_SPARSE_CROSSOVER = '100';
    try {
      const response = await uploadRoute(uploadRequest({ name: uniqueName('Spring chain') }, chainFiles(60)), noParams);
      expect(response.status).toBe(202);
      const body = (await response.json()) as { version: { id: string; states: number; inputs: number; outputs: number } };
      expect(body.version).toMatchObject({ states: 120, inputs: 1, outputs: 1 });
      const row = await db()('source_versions').where({ id: body.version.id }).first();
      expect(row.format).toBe('second-order');
      // A = [[0, I], [−K, −D]]: 60 + nnz(K) + nnz(D), with K and D tridiagonal (60 + 2·59 each).
      expect(Number(row.nonzeros_a)).toBe(60 + 2 * (60 + 2 * 59));
    } finally {
      delete process.env.MODESHELF_SPARSE_CROSSOVER;
    }
  });

  describe('refusals name the field and leave nothing behind', () => {
    it('E of another size than A', async () => {
      const files = plateFiles(33, ['A', 'B', 'C']);
      files.push({ field: 'E', name: 'E.mtx', text: diagonal(33 * 33 - 1) });
      await refused(files, 422, 'invalid_model_dimension_mismatch', 'E', /^E\.mtx: E is 1088×1088 but C has 1089 columns/);
    });

    it('B of the wrong height', async () => {
      const files = plateFiles(33, ['A', 'C', 'E']);
      files.push({ field: 'B', name: 'B.mtx', text: hearthPlate(32).B });
      await refused(files, 422, 'invalid_model_dimension_mismatch', 'B', /B has 1024 rows but A has 1089 states/);
    });

    it('a value of A that is not a number, with its line', async () => {
      const files = plateFiles(33);
      const lines = (files[0].text as string).split('\n');
      lines[3] = lines[3].replace(/\S+$/, 'warm'); // the first entry, on line 4 (after the header, a comment and the size line)
      files[0] = { ...files[0], text: lines.join('\n') };
      await refused(files, 422, 'invalid_model_non_numeric', 'A', /^A\.mtx: line 4: value "warm" of A is not a number/);
    });

    it('an A that is not square', async () => {
      const files = plateFiles(33);
      files[0] = { ...files[0], text: (files[0].text as string).replace(/\n1089 1089 /, '\n1089 1090 ') };
      await refused(files, 422, 'invalid_model_not_square', 'A', /A must be square, the file declares 1089×1090/);
    });

    it('E beside an A given as CSV', async () => {
      const files: UploadFile[] = [
        { field: 'A', name: 'A.csv', text: '-1,0\n0,-2\n' },
        { field: 'B', name: 'B.csv', text: '1\n1\n' },
        { field: 'C', name: 'C.csv', text: '1,1\n' },
        { field: 'E', name: 'E.mtx', text: diagonal(2) },
      ];
      await refused(files, 422, 'invalid_model_unsupported_format', 'A', /with a descriptor matrix E, A must be a Matrix Market coordinate file/);
    });

    it('a second-order C whose width is neither q nor 2q', async () => {
      process.env.MODESHELF_SPARSE_CROSSOVER = '100';
      try {
        await refused(chainFiles(60, 61), 422, 'invalid_model_dimension_mismatch', 'C', /C has 61 columns, but the model has 60 degrees of freedom/);
      } finally {
        delete process.env.MODESHELF_SPARSE_CROSSOVER;
      }
    });

    it('a second-order model without K', async () => {
      await refused(chainFiles(10).filter((f) => f.field !== 'stiffness'), 400, 'missing_file', 'stiffness', /stiffness matrix K file is missing/);
    });

    it('an archive beside single files, a member it cannot place, and a mismatched E inside an archive', async () => {
      const plate = plateFiles(20);
      const zip = await zipOf(plate.map((f) => ({ name: `${f.field}.mtx`, text: f.text as string })));
      await refused([{ field: 'archive', name: 'p.zip', text: zip }, plate[0]], 400, 'invalid_request', 'archive');
      const odd = await zipOf([...plate.map((f) => ({ name: `${f.field}.mtx`, text: f.text as string })), { name: 'notes.txt', text: 'hearth plate' }]);
      await refused([{ field: 'archive', name: 'odd.zip', text: odd }], 422, 'invalid_archive_unknown_member', 'archive', /“notes\.txt” is not a model file/);
      const badE = await zipOf([...plate.slice(0, 3).map((f) => ({ name: `${f.field}.mtx`, text: f.text as string })), { name: 'E.mtx', text: diagonal(399) }]);
      await refused([{ field: 'archive', name: 'bad-e.zip', text: badE }], 422, 'invalid_model_dimension_mismatch', 'archive', /E is 399×399 but C has 400 columns.*\(in bad-e\.zip: E\)/);
      await refused([{ field: 'archive', name: 'plain.zip', text: Buffer.from('not a zip at all') }], 422, 'invalid_archive_unreadable_archive', 'archive');
    });
  });
});
