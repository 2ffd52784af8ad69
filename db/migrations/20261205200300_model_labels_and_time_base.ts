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
// the store keep their bytes (their checksums identify the upload); the engine reads labels and timeBase only.
import type { Knex } from 'knex';

async function renameColumn(knex: Knex, table: string, from: string, to: string): Promise<void> {
  await knex.raw(`DO $$ BEGIN
    IF EXISTS (SELECT 1 FROM information_schema.columns
                WHERE table_schema = current_schema() AND table_name = '${table}' AND column_name = '${from}') THEN
      ALTER TABLE ${table} RENAME COLUMN ${from} TO ${to};
    END IF;
  END $$`);
}

/** SQL renaming key `from` to `to` in the jsonb object column `col` of `table`. */
async function renameKey(knex: Knex, table: string, col: string, from: string, to: string): Promise<void> {
  await knex.raw(`UPDATE ${table} SET ${col} = (${col} - '${from}') || jsonb_build_object('${to}', ${col} -> '${from}')
                   WHERE jsonb_typeof(${col}) = 'object' AND ${col} -> '${from}' IS NOT NULL`);
}

export async function up(knex: Knex): Promise<void> {
  await renameColumn(knex, 'source_models', 'time_unit', 'time_base');

  await knex.raw(`UPDATE analyses
       SET result = (result - 'inputNames' - 'outputNames')
                    || jsonb_build_object('labels', jsonb_build_object('inputs', COALESCE(result -> 'inputNames', 'null'::jsonb),
                                                                       'outputs', COALESCE(result -> 'outputNames', 'null'::jsonb)))
     WHERE result -> 'inputNames' IS NOT NULL OR result -> 'outputNames' IS NOT NULL`);
  await renameKey(knex, 'analyses', 'result', 'timeUnit', 'timeBase');

  await knex.raw('ALTER TABLE reduced_versions DISABLE TRIGGER reduced_versions_guard');
  await knex.raw(`UPDATE reduced_versions
       SET matrices = (matrices - 'inputNames' - 'outputNames' - 'stateNames')
                      || jsonb_build_object('labels', jsonb_strip_nulls(jsonb_build_object('inputs', matrices -> 'inputNames',
                                                                                            'outputs', matrices -> 'outputNames',
                                                                                            'states', matrices -> 'stateNames')))
     WHERE matrices -> 'inputNames' IS NOT NULL OR matrices -> 'outputNames' IS NOT NULL OR matrices -> 'stateNames' IS NOT NULL`);
  await renameKey(knex, 'reduced_versions', 'matrices', 'timeUnit', 'timeBase');
  await knex.raw('ALTER TABLE reduced_versions ENABLE TRIGGER reduced_versions_guard');
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE reduced_versions DISABLE TRIGGER reduced_versions_guard');
  await renameKey(knex, 'reduced_versions', 'matrices', 'timeBase', 'timeUnit');
  await knex.raw(`UPDATE reduced_versions
       SET matrices = (matrices - 'labels')
                      || jsonb_strip_nulls(jsonb_build_object('inputNames', matrices #> '{labels,inputs}',
                                                              'outputNames', matrices #> '{labels,outputs}',
                                                              'stateNames', matrices #> '{labels,states}'))
     WHERE matrices -> 'labels' IS NOT NULL`);
  await knex.raw('ALTER TABLE reduced_versions ENABLE TRIGGER reduced_versions_guard');

  await renameKey(knex, 'analyses', 'result', 'timeBase', 'timeUnit');
  await knex.raw(`UPDATE analyses
       SET result = (result - 'labels')
                    || jsonb_build_object('inputNames', COALESCE(result #> '{labels,inputs}', 'null'::jsonb),
                                          'outputNames', COALESCE(result #> '{labels,outputs}', 'null'::jsonb))
     WHERE result -> 'labels' IS NOT NULL`);
  await renameColumn(knex, 'source_models', 'time_base', 'time_unit');
}
