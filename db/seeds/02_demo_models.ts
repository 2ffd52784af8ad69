// Demo source models of Quillmere Kilnworks (db/seeds/demo/models.ts), each uploaded by the demo engineer,
// analysed, and reduced once, so a newcomer sees real screens at once:
//
//   K-7 kiln wall thermal network   1000 states (50 nodes through the wall × 20 zones), 2 inputs, 3 outputs,
//                                   Matrix Market files; stiff (time constants from a fraction of a second
//                                   to hours); balanced truncation with an acceptance band.
//   Rig frame, axial                300 states (150 masses), second-order JSON, one rigid-body mode;
//                                   modal truncation by dominance.
//   Burner air/fuel train           12 states, 2 inputs, 3 outputs, CSV files; balanced residualization.
//
// The seed runs the engine here, synchronously, rather than through the job queue (no worker may be running
// while the database is seeded); it writes the same rows the jobs would, including succeeded job records.
// Skipped for a model that already exists, so re-running `npm start` keeps what is there.
//
// Time: analysis and reduction of a dense model grow as n³. Measured on the two-core development machine
// with the native backend (busy with other work): the thousand-state wall's analysis takes about 3.4 s and
// its reduction (with the comparison's responses and the simulation-cost report) about 15.6 s; the whole seed
// took 26 s, once (later starts skip it). The test command seeds the same models with
// a 200-state wall (MODESHELF_DEMO_WALL=small, 10 nodes × 20 zones), because the tests upload and reduce
// their own models and only need the demo rows to exist; `npm run bench:web` runs a thousand-state wall
// through the real upload and queue.
import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { Knex } from 'knex';
import { DEMO_PEOPLE } from './01_demo_people';
import { burnerPlant, csvOf, kilnWallNetwork, matrixMarketCoordinate, rigFrameStructure } from './demo/models';
import { storeFile } from '../../lib/uploads/store';
import { fetchToScratch } from '../../lib/storage/scratch';
import { tempDir } from '../../lib/uploads/receive';
import { loadModel, type FileRole, type ModelFile } from '../../lib/engine-tasks/model-files';
import { runAnalysis } from '../../lib/engine-tasks/analysis-task';
import { runReduction, type RecipeInput } from '../../lib/engine-tasks/reduction-task';
import { ENGINE_VERSION } from '../../lib/engine-tasks/engine-version';
import type { AnalysisRecord } from '../../lib/engine-tasks/records';
import { versionChecksum } from '../../lib/source-models';
import { registerReducedVersion } from '../../lib/reduced-models';
import { recordAudit } from '../../lib/audit';

interface DemoFile {
  role: FileRole;
  name: string;
  text: string;
}

interface DemoReduction {
  name: string;
  description: string;
  recipe: (analysis: AnalysisRecord) => RecipeInput;
}

interface DemoModel {
  slug: string;
  name: string;
  description: string;
  tags: string[];
  notes: string;
  files: () => DemoFile[];
  reduction: DemoReduction;
}

/** Nodes through the wall: 50 (1000 states), or 10 (200 states) when MODESHELF_DEMO_WALL=small (tests). */
function wallLayers(): number {
  return process.env.MODESHELF_DEMO_WALL === 'small' ? 10 : 50;
}

const DEMO_MODELS: DemoModel[] = [
  {
    slug: 'k7-kiln-wall',
    name: 'K-7 kiln wall thermal network',
    description:
      `Lumped thermal network of one wall of the K-7 electric kiln: heating-element sheath, hot-face brick, insulating firebrick, ceramic fibre and steel casing, ${wallLayers()} nodes through the thickness in 20 zones up the wall. Inputs: upper and lower heater zone power (W). Outputs: upper and lower control thermocouples and the casing temperature (K above ambient).`,
    tags: ['thermal', 'kiln', 'stiff'],
    notes: 'Exported from the wall design sheet, revision C.',
    files: () => {
      const m = kilnWallNetwork(wallLayers(), 20);
      return [
        { role: 'A', name: 'k7-wall-A.mtx', text: matrixMarketCoordinate(m.A, 'K-7 kiln wall: A = -C^-1 G, 1/s') },
        { role: 'B', name: 'k7-wall-B.mtx', text: matrixMarketCoordinate(m.B, 'heater zones: upper, lower (K/J)') },
        { role: 'C', name: 'k7-wall-C.mtx', text: matrixMarketCoordinate(m.C, 'upper thermocouple, lower thermocouple, casing') },
      ];
    },
    reduction: {
      name: 'K-7 wall, control model',
      description: 'Balanced truncation for the zone temperature controllers; the controls team needs 1 % of the peak gain below 0.01 rad/s.',
      recipe: (a) => ({
        method: 'balanced',
        order: 12,
        tolerance: null,
        acceptance: { minFrequency: 1e-5, maxFrequency: 1e-2, maxError: 0.01 * (a.stablePartHInfinityNorm ?? 1) },
      }),
    },
  },
  {
    slug: 'rig-frame-axial',
    name: 'Rig frame, axial',
    description:
      'Axial model of the thermal test-rig frame on its transport air bearings: 150 lumped masses (stiffener plates every 25 bays), light stiffness-proportional damping, free at both ends (one rigid-body mode). Inputs: shaker force at the drive end and the damper actuator at mid-length (N). Outputs: tip displacement (m) and mid-length velocity (m/s).',
    tags: ['structure', 'second-order', 'rigid-body'],
    notes: 'Second-order export (mass, damping, stiffness) from the frame model.',
    files: () => [{ role: 'model', name: 'rig-frame-axial.json', text: JSON.stringify(rigFrameStructure(150)) }],
    reduction: {
      name: 'Rig frame, first modes',
      description: 'Modal truncation by dominance: the rigid-body mode kept exactly and the dominant flexible modes, for the shaker controller.',
      recipe: () => ({ method: 'modal', order: 12, tolerance: null, modal: { selection: 'dominance' } }),
    },
  },
  {
    slug: 'burner-air-fuel',
    name: 'Burner air/fuel train',
    description:
      'Identified model of the gas burner of test cell 3: gas valve and air damper in; flame temperature, flue oxygen and chamber pressure out.',
    tags: ['mimo', 'combustion'],
    notes: 'Identified from the step tests of the commissioning week.',
    files: () => {
      const m = burnerPlant(12);
      return [
        { role: 'A', name: 'burner-A.csv', text: csvOf(m.A) },
        { role: 'B', name: 'burner-B.csv', text: csvOf(m.B) },
        { role: 'C', name: 'burner-C.csv', text: csvOf(m.C) },
        { role: 'D', name: 'burner-D.csv', text: csvOf(m.D) },
      ];
    },
    reduction: {
      name: 'Burner, MPC model',
      description: 'Balanced residualization (DC gain kept) for the air/fuel ratio MPC.',
      recipe: (a) => ({
        method: 'residualization',
        order: 6,
        tolerance: null,
        acceptance: { minFrequency: 0.01, maxFrequency: 5, maxError: 0.05 * (a.stablePartHInfinityNorm ?? 1) },
      }),
    },
  },
];

// Stored like an upload (lib/storage: the local folder, or the object store with MODESHELF_STORAGE=s3) and
// read back the way a worker reads it.
async function storeDemoFile(file: DemoFile): Promise<ModelFile & { size: number; sha256: string; storageKey: string }> {
  const bytes = Buffer.from(file.text, 'utf8');
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const dir = tempDir();
  mkdirSync(dir, { recursive: true });
  const temp = path.join(dir, `seed-${sha256.slice(0, 16)}.part`);
  writeFileSync(temp, bytes);
  const stored = await storeFile(temp, sha256);
  return { role: file.role, name: file.name, path: await fetchToScratch(stored.storageKey), size: bytes.length, sha256, storageKey: stored.storageKey };
}

const log = (line: string) => console.log(`[seed demo models] ${line}`);

async function seedModel(knex: Knex, demo: DemoModel, engineerId: string): Promise<void> {
  if (await knex('source_models').where({ slug: demo.slug }).first('id')) {
    log(`${demo.name}: already there`);
    return;
  }
  const started = Date.now();
  const files: Awaited<ReturnType<typeof storeDemoFile>>[] = [];
  for (const file of demo.files()) files.push(await storeDemoFile(file));
  const { model, format } = loadModel(files);
  const checksum = versionChecksum(files);
  const analysis = runAnalysis(files, ENGINE_VERSION, () => {});
  log(`${demo.name}: ${model.A.rows} states analysed in ${((Date.now() - started) / 1000).toFixed(1)} s`);

  const version = await knex.transaction(async (trx) => {
    const [sourceModel] = await trx('source_models')
      .insert({ name: demo.name, slug: demo.slug, description: demo.description, time_base: 's', tags: demo.tags, created_by: engineerId })
      .returning('*');
    const [row] = await trx('source_versions')
      .insert({
        source_model_id: sourceModel.id,
        number: 1,
        checksum,
        format,
        files: JSON.stringify(files.map((f) => ({ role: f.role, name: f.name, size: f.size, sha256: f.sha256, storageKey: f.storageKey }))),
        states: analysis.states,
        inputs: analysis.inputs,
        outputs: analysis.outputs,
        nonzeros_a: analysis.nonzerosA,
        notes: demo.notes,
        uploaded_by: engineerId,
      })
      .returning('*');
    await trx('analyses').insert({ source_version_id: row.id, result: JSON.stringify(analysis), engine_version: ENGINE_VERSION });
    await trx('jobs').insert({
      kind: 'analysis',
      subject_type: 'source_version',
      subject_id: row.id,
      status: 'succeeded',
      stage: 'Done',
      fraction: 1,
      attempts: 1,
      attempt: 1,
      payload: JSON.stringify({ sourceVersionId: row.id, seeded: true }),
      result: JSON.stringify({ sourceVersionId: row.id, states: analysis.states, wallMs: analysis.wallMs }),
      created_by: engineerId,
      started_at: trx.fn.now(),
      finished_at: trx.fn.now(),
    });
    await recordAudit(trx, {
      actorId: engineerId,
      action: 'source_model.created',
      subjectType: 'source_version',
      subjectId: row.id,
      details: { sourceModel: demo.slug, number: 1, checksum, states: analysis.states, format, seeded: true },
    });
    return row;
  });

  const recipe = demo.reduction.recipe(analysis);
  const reductionStarted = Date.now();
  const record = runReduction(files, recipe, analysis, ENGINE_VERSION, () => {});
  log(`${demo.name}: reduced to ${record.order} states in ${((Date.now() - reductionStarted) / 1000).toFixed(1)} s`);
  await knex.transaction(async (trx) => {
    const [recipeRow] = await trx('recipes')
      .insert({
        method: recipe.method,
        order: recipe.order,
        tolerance: recipe.tolerance,
        options: JSON.stringify(recipe.modal ? { selection: recipe.modal.selection, ...(recipe.modal.band ? { band: recipe.modal.band } : {}) } : {}),
        acceptance: recipe.acceptance ? JSON.stringify(recipe.acceptance) : null,
        created_by: engineerId,
      })
      .returning('*');
    const payload = {
      recipeId: recipeRow.id,
      sourceVersionId: version.id,
      target: { kind: 'new', name: demo.reduction.name, description: demo.reduction.description },
      seeded: true,
    };
    const [job] = await trx('jobs')
      .insert({
        kind: 'reduction',
        subject_type: 'source_version',
        subject_id: version.id,
        status: 'running',
        stage: 'Writing the reduced model',
        attempts: 1,
        attempt: 1,
        payload: JSON.stringify(payload),
        created_by: engineerId,
        started_at: trx.fn.now(),
      })
      .returning('*');
    const registered = await registerReducedVersion(trx, job, record);
    await trx('jobs')
      .where({ id: job.id })
      .update({ status: 'succeeded', stage: 'Done', fraction: 1, result: JSON.stringify(registered), finished_at: trx.fn.now() });
  });
}

export async function seed(knex: Knex): Promise<void> {
  const engineer = await knex('users').where({ email: DEMO_PEOPLE[1].email }).first('id');
  if (!engineer) throw new Error(`the demo engineer ${DEMO_PEOPLE[1].email} is missing; 01_demo_people must run first`);
  const started = Date.now();
  for (const demo of DEMO_MODELS) await seedModel(knex, demo, engineer.id);
  log(`done in ${((Date.now() - started) / 1000).toFixed(1)} s`);
}
