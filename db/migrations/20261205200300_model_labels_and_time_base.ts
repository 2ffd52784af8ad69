// Names of our own (issue 16): a model's names of its inputs, outputs and states are its "labels"
// ({ inputs, outputs, states }) and its unit of time is its "timeBase", in model files, the engine, the API,
// the exports and what the database holds. This migration moves what was written before it:
//   - source_models.time_unit → time_base;
//   - analyses.result: the input and output name lists become labels: { inputs, outputs } (null where the
//     model gave none), the time unit becomes timeBase;
//   - reduced_versions.matrices: the name lists become labels: { inputs, outputs, states } (only those given),
//     the time unit becomes timeBase. The matrices themselves and their registered SHA-256 (over A, B, C, D
//     only, lib/checksums.ts) do not change. The column is frozen once a version is submitted
//     (reduced_versions_guard, 20261202000200); the guard is off for these statements only, inside the
//     migration's transaction.
// Every statement leaves rows already in the new shape alone, so `up` may run again. Model files already in
// the store keep their bytes (their checksums identify the upload): a JSON model stored in the earlier shape
// is refused by the reader when a job reads it again, with a message naming the key and the new shape, and
// has to be uploaded again as a new version.
import type { Knex } from 'knex';

/** Old key of each label list → its place under "labels" (exported for the migration's test). */
export const LABEL_KEYS: [string, 'inputs' | 'outputs' | 'states'][] = [
  ['inputNames', 'inputs'],
  ['outputNames', 'outputs'],
  ['stateNames', 'states'],
];
/** The time base's old and new key. */
export const TIME_KEY: [string, string] = ['timeUnit', 'timeBase'];

async function renameColumn(knex: Knex, table: string, from: string, to: string): Promise<void> {
  await knex.raw(`DO $$ BEGIN
    IF EXISTS (SELECT 1 FROM information_schema.columns
                WHERE table_schema = current_schema() AND table_name = '${table}' AND column_name = '${from}') THEN
      ALTER TABLE ${table} RENAME COLUMN ${from} TO ${to};
    END IF;
  END $$`);
}

/** Renames key `from` to `to` in the jsonb object column `col` of `table`. */
async function renameKey(knex: Knex, table: string, col: string, from: string, to: string): Promise<void> {
  await knex.raw(`UPDATE ${table} SET ${col} = (${col} - '${from}') || jsonb_build_object('${to}', ${col} -> '${from}')
                   WHERE jsonb_typeof(${col}) = 'object' AND ${col} -> '${from}' IS NOT NULL`);
}

/**
 * Moves the label lists of `col` under "labels". Analyses keep { inputs, outputs } with null for a list the model
 * did not give (their record's shape); reduced versions keep only the lists given.
 */
async function gatherLabels(knex: Knex, table: string, col: string, keys: [string, string][], nullForMissing: boolean): Promise<void> {
  const removed = keys.map(([old]) => ` - '${old}'`).join('');
  const pairs = keys.map(([old, place]) => `'${place}', ${nullForMissing ? `COALESCE(${col} -> '${old}', 'null'::jsonb)` : `${col} -> '${old}'`}`).join(', ');
  const labels = nullForMissing ? `jsonb_build_object(${pairs})` : `jsonb_strip_nulls(jsonb_build_object(${pairs}))`;
  const any = keys.map(([old]) => `${col} -> '${old}' IS NOT NULL`).join(' OR ');
  await knex.raw(`UPDATE ${table} SET ${col} = (${col}${removed}) || jsonb_build_object('labels', ${labels})
                   WHERE jsonb_typeof(${col}) = 'object' AND (${any})`);
}

/** The reverse of gatherLabels: each list back under its old key, "labels" removed. */
async function scatterLabels(knex: Knex, table: string, col: string, keys: [string, string][], nullForMissing: boolean): Promise<void> {
  const pairs = keys.map(([old, place]) => `'${old}', ${nullForMissing ? `COALESCE(${col} #> '{labels,${place}}', 'null'::jsonb)` : `${col} #> '{labels,${place}}'`}`).join(', ');
  const restored = nullForMissing ? `jsonb_build_object(${pairs})` : `jsonb_strip_nulls(jsonb_build_object(${pairs}))`;
  await knex.raw(`UPDATE ${table} SET ${col} = (${col} - 'labels') || ${restored}
                   WHERE jsonb_typeof(${col}) = 'object' AND ${col} -> 'labels' IS NOT NULL`);
}

const ANALYSIS_LABELS = LABEL_KEYS.filter(([, place]) => place !== 'states');

export async function up(knex: Knex): Promise<void> {
  await renameColumn(knex, 'source_models', 'time_unit', 'time_base');
  await gatherLabels(knex, 'analyses', 'result', ANALYSIS_LABELS, true);
  await renameKey(knex, 'analyses', 'result', TIME_KEY[0], TIME_KEY[1]);
  await knex.raw('ALTER TABLE reduced_versions DISABLE TRIGGER reduced_versions_guard');
  await gatherLabels(knex, 'reduced_versions', 'matrices', LABEL_KEYS, false);
  await renameKey(knex, 'reduced_versions', 'matrices', TIME_KEY[0], TIME_KEY[1]);
  await knex.raw('ALTER TABLE reduced_versions ENABLE TRIGGER reduced_versions_guard');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE reduced_versions DISABLE TRIGGER reduced_versions_guard');
  await renameKey(knex, 'reduced_versions', 'matrices', TIME_KEY[1], TIME_KEY[0]);
  await scatterLabels(knex, 'reduced_versions', 'matrices', LABEL_KEYS, false);
  await knex.raw('ALTER TABLE reduced_versions ENABLE TRIGGER reduced_versions_guard');
  await renameKey(knex, 'analyses', 'result', TIME_KEY[1], TIME_KEY[0]);
  await scatterLabels(knex, 'analyses', 'result', ANALYSIS_LABELS, true);
  await renameColumn(knex, 'source_models', 'time_base', 'time_unit');
}
