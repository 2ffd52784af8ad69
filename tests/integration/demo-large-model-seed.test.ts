// The demo seed's large model (db/seeds/03_demo_large_model.ts): the K-7 hearth plate registered as v1 with
// its four Matrix Market files in the store and its analysis queued as a large-class job (never run by the
// seed itself), once; MODESHELF_DEMO_PLATE chooses its size or leaves it out. Expected sizes are counted
// from the plate's definition: side² states, 2 inputs, 3 outputs.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { objectStore } from '@/lib/storage';
import { seed as seedPeople } from '@/db/seeds/01_demo_people';
import { plateSide, seed as seedPlate } from '@/db/seeds/03_demo_large_model';
import { migrateTestDatabase } from './helpers';
import { tempUploadsDir } from './fixtures/model-uploads';

// The test registers the plate under a slug of its own: the test command's seed (scripts/test.sh) has
// usually registered the demo's already, with its files in another store.
const slug = `k7-hearth-plate-${Date.now().toString(36)}`;

beforeAll(async () => {
  process.env.MODESHELF_UPLOADS_DIR = tempUploadsDir();
  process.env.MODESHELF_QUEUE_PREFIX = `s${Date.now().toString(36)}-`;
  await migrateTestDatabase();
  await seedPeople(db());
});

afterAll(async () => {
  delete process.env.MODESHELF_DEMO_PLATE;
  await closeQueue();
  await closeDb();
});

describe('the demo seed’s large model', () => {
  it('reads its size from MODESHELF_DEMO_PLATE and refuses a setting it does not know', () => {
    const at = (v: string | undefined) => {
      if (v === undefined) delete process.env.MODESHELF_DEMO_PLATE;
      else process.env.MODESHELF_DEMO_PLATE = v;
      return plateSide();
    };
    expect(at(undefined)).toBe(150);
    expect(at('full')).toBe(150);
    expect(at('small')).toBe(40);
    expect(at('off')).toBeNull();
    expect(() => at('huge')).toThrow(/MODESHELF_DEMO_PLATE must be full, small or off/);
  });

  it('registers the plate with its files stored and its analysis queued as a large job, once', async () => {
    process.env.MODESHELF_DEMO_PLATE = 'small';
    await seedPlate(db(), slug);
    await seedPlate(db(), slug); // a second start keeps what is there
    const models = await db()('source_models').where({ slug });
    expect(models).toHaveLength(1);
    const versions = await db()('source_versions').where({ source_model_id: models[0].id });
    expect(versions).toHaveLength(1);
    expect(versions[0]).toMatchObject({ number: 1, states: 40 * 40, inputs: 2, outputs: 3, format: 'matrix-market' });
    // A: the diagonal, and each of the 2·40·39 neighbour couplings twice.
    expect(Number(versions[0].nonzeros_a)).toBe(1600 + 2 * 2 * 40 * 39);
    const files = versions[0].files as { role: string; storageKey: string }[];
    expect(files.map((f) => f.role)).toEqual(['A', 'B', 'C', 'E']);
    for (const f of files) expect(await objectStore().exists(f.storageKey)).toBe(true);
    const jobs = await db()('jobs').where({ subject_id: versions[0].id, kind: 'analysis' });
    expect(jobs).toHaveLength(1);
    expect(jobs[0]).toMatchObject({ status: 'queued', worker_class: 'large' });
    expect(jobs[0].payload).toMatchObject({ enginePath: 'sparse', seeded: true });
    expect(await db()('analyses').where({ source_version_id: versions[0].id })).toHaveLength(0);
  });
});
