// The demo shelf's large model: the hearth plate of the K-7 kiln car (db/seeds/demo/plate.ts), 150 × 150
// nodes = 22,500 states in descriptor form, generated here as Matrix Market files (nothing large is
// committed), stored like an upload and registered as v1 by the demo engineer. Its analysis is not run
// here: it is queued as a job of the large worker class (lib/jobs/worker-class.ts), exactly as an upload's
// would be, so `npm start` is not delayed and the worker that `npm start` runs analyses it in the
// background (about 15 s on two cores; the version page shows its progress meanwhile).
//
// MODESHELF_DEMO_PLATE: unset or "full" for 150 × 150; "small" for 40 × 40 (1600 states, still above the
// engine's crossover, so still the large-model path; the test command uses it); "off" to leave it out.
// Skipped when the model already exists, so re-running `npm start` keeps what is there.
import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { Knex } from 'knex';
import { DEMO_PEOPLE } from './01_demo_people';
import { hearthPlate } from './demo/plate';
import { storeFile } from '../../lib/uploads/store';
import { tempDir } from '../../lib/uploads/receive';
import { versionChecksum } from '../../lib/source-models';
import { createJob } from '../../lib/jobs/jobs';
import { closeQueue } from '../../lib/jobs/queue';
import { recordAudit } from '../../lib/audit';
import type { FileRole } from '../../lib/engine-tasks/model-files';

const SLUG = 'k7-hearth-plate';

/** Nodes per side: 150 (22,500 states), 40 when MODESHELF_DEMO_PLATE=small, none when "off". */
export function plateSide(): number | null {
  const setting = (process.env.MODESHELF_DEMO_PLATE ?? 'full').trim();
  if (setting === 'off') return null;
  if (setting === 'small') return 40;
  if (setting === 'full' || setting === '') return 150;
  throw new Error(`MODESHELF_DEMO_PLATE must be full, small or off, got "${setting}"`);
}

const log = (line: string) => console.log(`[seed demo large model] ${line}`);

/** `slug` is for tests, which register the plate under a slug of their own beside the test database's seed. */
export async function seed(knex: Knex, slug: string = SLUG): Promise<void> {
  const side = plateSide();
  if (side === null) {
    log('left out (MODESHELF_DEMO_PLATE=off)');
    return;
  }
  if (await knex('source_models').where({ slug }).first('id')) {
    log('K-7 hearth plate: already there');
    return;
  }
  const engineer = await knex('users').where({ email: DEMO_PEOPLE[1].email }).first('id');
  if (!engineer) throw new Error(`the demo engineer ${DEMO_PEOPLE[1].email} is missing; 01_demo_people must run first`);
  const started = Date.now();
  const plate = hearthPlate(side);
  const dir = tempDir();
  mkdirSync(dir, { recursive: true });
  const files: { role: FileRole; name: string; size: number; sha256: string; storageKey: string }[] = [];
  for (const role of ['A', 'B', 'C', 'E'] as const) {
    const bytes = Buffer.from(plate[role], 'utf8');
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const temp = path.join(dir, `seed-${sha256.slice(0, 16)}.part`);
    writeFileSync(temp, bytes);
    const stored = await storeFile(temp, sha256);
    files.push({ role, name: `k7-hearth-${role}.mtx`, size: bytes.length, sha256, storageKey: stored.storageKey });
  }
  const checksum = versionChecksum(files);
  const nonzerosA = 2 * Number(plate.A.split('\n')[2].split(' ')[2]) - plate.states; // A is stored "symmetric"
  try {
    await knex.transaction(async (trx) => {
      const [model] = await trx('source_models')
        .insert({
          name: 'K-7 kiln car hearth plate',
          slug,
          description:
            `Thermal network of the silicon-carbide hearth plate of the K-7 kiln car (1.5 m × 1.5 m × 25 mm), ${side} × ${side} nodes, in descriptor form: ` +
            'E holds the cells’ heat capacities, A their conductances and the losses through the car deck. Inputs: left and right heater zone power (W). ' +
            'Outputs: centre, left-zone and corner thermocouples (K above ambient).',
          time_base: 's',
          tags: ['thermal', 'kiln', 'large', 'descriptor'],
          created_by: engineer.id,
        })
        .returning('*');
      const [version] = await trx('source_versions')
        .insert({
          source_model_id: model.id,
          number: 1,
          checksum,
          format: 'matrix-market',
          files: JSON.stringify(files),
          states: plate.states,
          inputs: 2,
          outputs: 3,
          nonzeros_a: nonzerosA,
          notes: 'Generated from the plate design sheet, mesh revision B.',
          uploaded_by: engineer.id,
        })
        .returning('*');
      // Queued like an upload's analysis: the large class, decided from the version's size.
      const job = await createJob(trx, {
        kind: 'analysis',
        subjectType: 'source_version',
        subjectId: version.id,
        payload: { sourceVersionId: version.id, enginePath: 'sparse', seeded: true },
        createdBy: engineer.id,
      });
      await recordAudit(trx, {
        actorId: engineer.id,
        action: 'source_model.created',
        subjectType: 'source_version',
        subjectId: version.id,
        details: { sourceModel: slug, number: 1, checksum, states: plate.states, format: 'matrix-market', seeded: true },
      });
      log(`K-7 hearth plate: ${plate.states} states registered in ${((Date.now() - started) / 1000).toFixed(1)} s; its analysis is queued as a ${job.worker_class} job`);
    });
  } finally {
    await closeQueue();
  }
}
