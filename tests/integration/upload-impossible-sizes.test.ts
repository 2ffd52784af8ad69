// Impossible sizes through the upload route (issue 15): a Matrix Market file declaring 10⁸ × 10⁸ and a
// CSV past MODESHELF_MAX_DENSE_ENTRIES are refused by the engine's check (in its child process) with a 4xx
// that names the file, the declared size and the limit; no row and no file are left behind, and the server
// process answers the next, valid upload. Expected sizes are those written into the test files.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('next-auth', async (importOriginal) => ({ ...(await importOriginal<typeof import('next-auth')>()), getServerSession: vi.fn() }));

import { getServerSession } from 'next-auth';
import { closeDb } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { POST as uploadRoute } from '@/app/api/uploads/source-models/route';
import { makeUser, migrateTestDatabase } from './helpers';
import { SMALL, csv, firstOrderJson, listFiles, matrixMarketArray, rowsBy, tempUploadsDir, uniqueName, uploadRequest } from './fixtures/model-uploads';

let uploads = '';
let engineerId = '';
const noParams = { params: Promise.resolve({}) };

beforeAll(async () => {
  uploads = tempUploadsDir();
  process.env.MODESHELF_UPLOADS_DIR = uploads;
  process.env.MODESHELF_QUEUE_PREFIX = `t${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  engineerId = (await makeUser({ role: 'engineer', label: 'sizes' })).id;
  vi.mocked(getServerSession).mockResolvedValue({ user: { id: engineerId } } as never);
});

afterAll(async () => {
  delete process.env.MODESHELF_MAX_DENSE_ENTRIES;
  await closeQueue();
  await closeDb();
});

describe('uploads declaring impossible sizes', () => {
  it('answers 422 naming the file, the 10⁸ × 10⁸ size and the limit, stores nothing, and serves the next upload', async () => {
    const before = await rowsBy(engineerId);
    const filesBefore = listFiles(uploads);
    const huge = '%%MatrixMarket matrix array real general\n100000000 100000000\n-1\n0\n0\n';
    const response = await uploadRoute(
      uploadRequest({ name: uniqueName('Impossible') }, [
        { field: 'A', name: 'A.mtx', text: huge },
        { field: 'B', name: 'B.mtx', text: matrixMarketArray(SMALL.B) },
        { field: 'C', name: 'C.mtx', text: matrixMarketArray(SMALL.C) },
      ]),
      noParams,
    );
    expect(response.status).toBe(422);
    const body = (await response.json()) as { error: { code: string; field: string; message: string } };
    expect(body.error.code).toBe('invalid_model_too_large');
    expect(body.error.field).toBe('A');
    expect(body.error.message).toMatch(/^A\.mtx: A declares 100,000,000×100,000,000 \(10,000,000,000,000,000 entries\), more than the limit of 25,000,000 entries/);
    expect(await rowsBy(engineerId)).toEqual(before);
    expect(listFiles(uploads)).toEqual(filesBefore);

    const ok = await uploadRoute(uploadRequest({ name: uniqueName('After impossible') }, [{ field: 'model', name: 'm.json', text: firstOrderJson() }]), noParams);
    expect(ok.status).toBe(202);
  });

  it('takes the limit from MODESHELF_MAX_DENSE_ENTRIES in the checking process (a 3 × 3 CSV A against a limit of 8)', async () => {
    process.env.MODESHELF_MAX_DENSE_ENTRIES = '8';
    try {
      const before = await rowsBy(engineerId);
      const filesBefore = listFiles(uploads);
      const response = await uploadRoute(
        uploadRequest({ name: uniqueName('Over limit') }, [
          { field: 'A', name: 'A.csv', text: csv(SMALL.A) },
          { field: 'B', name: 'B.csv', text: csv(SMALL.B) },
          { field: 'C', name: 'C.csv', text: csv(SMALL.C) },
        ]),
        noParams,
      );
      expect(response.status).toBe(422);
      const body = (await response.json()) as { error: { code: string; message: string } };
      expect(body.error).toMatchObject({ code: 'invalid_model_too_large', message: expect.stringMatching(/^A\.csv: A declares 3×3 \(9 entries\), more than the limit of 8 entries/) });
      expect(await rowsBy(engineerId)).toEqual(before);
      expect(listFiles(uploads)).toEqual(filesBefore);
    } finally {
      delete process.env.MODESHELF_MAX_DENSE_ENTRIES;
    }
  });
});
