// Names of our own (issue 16): H∞ figures are named hInfinity…, the DC gain zeroFrequencyGain, in the code, the
// API and what the database holds. This migration renames the pins' limit column and the keys of the JSON
// written before it:
//   - pins.max_relative_hinf_error → max_relative_h_infinity_error (its CHECK constraints follow the column);
//   - analyses.result: dcGain, hinfNorm, stablePartHinfNorm;
//   - accuracy_reports.figures and the approval snapshot reduced_versions.approved_figures.figures:
//     hinfError, hinfErrorFrequency, hinfErrorRelative, referenceHinfNorm, dcGainError.
// Values are moved unchanged; every step leaves rows already in the new shape alone, so it may run again.
// The approval snapshot is frozen by reduced_versions_guard (20261202000200); the guard is switched off for
// these statements only, inside the migration's transaction, so the snapshot's figures keep their values and
// only their names change. audit_events stays as it was written (append-only:
// the history of pin changes keeps the limit names of its day).
import type { Knex } from 'knex';

/** Old → new keys of analyses.result (exported for the migration's test). */
export const ANALYSIS_KEYS: [string, string][] = [
  ['dcGain', 'zeroFrequencyGain'],
  ['hinfNorm', 'hInfinityNorm'],
  ['stablePartHinfNorm', 'stablePartHInfinityNorm'],
];

/** Old → new keys of accuracy figures and of the approval snapshot's figures. */
export const FIGURE_KEYS: [string, string][] = [
  ['hinfError', 'hInfinityError'],
  ['hinfErrorFrequency', 'hInfinityErrorFrequency'],
  ['hinfErrorRelative', 'hInfinityErrorRelative'],
  ['referenceHinfNorm', 'referenceHInfinityNorm'],
  ['dcGainError', 'zeroFrequencyGainError'],
];

/** SQL that renames key `from` to `to` in the jsonb object `expr` (unchanged when `from` is absent). */
function renamed(expression: string, from: string, to: string): string {
  const expr = `(${expression})`;
  return `CASE WHEN jsonb_typeof(${expr}) = 'object' AND ${expr} -> '${from}' IS NOT NULL
               THEN (${expr} - '${from}') || jsonb_build_object('${to}', ${expr} -> '${from}') ELSE ${expr} END`;
}

async function renameKeys(knex: Knex, pairs: [string, string][]): Promise<void> {
  for (const [from, to] of pairs) {
    await knex.raw(`UPDATE analyses SET result = ${renamed('result', from, to)} WHERE result -> '${from}' IS NOT NULL`);
  }
}

async function renameFigureKeys(knex: Knex, pairs: [string, string][]): Promise<void> {
  for (const [from, to] of pairs) {
    await knex.raw(`UPDATE accuracy_reports SET figures = ${renamed('figures', from, to)} WHERE figures -> '${from}' IS NOT NULL`);
  }
  await knex.raw('ALTER TABLE reduced_versions DISABLE TRIGGER reduced_versions_guard');
  for (const [from, to] of pairs) {
    await knex.raw(`UPDATE reduced_versions
                       SET approved_figures = jsonb_set(approved_figures, '{figures}', ${renamed("approved_figures -> 'figures'", from, to)})
                     WHERE approved_figures #> '{figures,${from}}' IS NOT NULL`);
  }
  await knex.raw('ALTER TABLE reduced_versions ENABLE TRIGGER reduced_versions_guard');
}

/** Renames a column only when it is there under its old name, so `up` may run again over rows written since. */
async function renameColumn(knex: Knex, table: string, from: string, to: string): Promise<void> {
  await knex.raw(`DO $$ BEGIN
    IF EXISTS (SELECT 1 FROM information_schema.columns
                WHERE table_schema = current_schema() AND table_name = '${table}' AND column_name = '${from}') THEN
      ALTER TABLE ${table} RENAME COLUMN ${from} TO ${to};
    END IF;
  END $$`);
}

export async function up(knex: Knex): Promise<void> {
  await renameColumn(knex, 'pins', 'max_relative_hinf_error', 'max_relative_h_infinity_error');
  await renameKeys(knex, ANALYSIS_KEYS);
  await renameFigureKeys(knex, FIGURE_KEYS);
}

export async function down(knex: Knex): Promise<void> {
  const back = (pairs: [string, string][]) => pairs.map(([from, to]) => [to, from] as [string, string]);
  await renameFigureKeys(knex, back(FIGURE_KEYS));
  await renameKeys(knex, back(ANALYSIS_KEYS));
  await renameColumn(knex, 'pins', 'max_relative_h_infinity_error', 'max_relative_hinf_error');
}
