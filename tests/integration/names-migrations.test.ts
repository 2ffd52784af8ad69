// The migrations of issue 16's "names of our own" on the real PostgreSQL: rows written in the earlier shape
// (built here from the key lists each migration declares) come out in the new shape with every value kept,
// frozen approval snapshots and registered matrices included, and a second run changes nothing. Each `up`
// runs inside a transaction, so the review guard it switches off for its own statements is back on whatever
// happens; rows already in the new shape (everything the rest of the suite writes) are left alone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { closeDb, db } from '@/lib/db';
import type { UserRow } from '@/lib/people';
import { makeUser, migrateTestDatabase } from './helpers';
import { FIRST_ORDER_LAG, makeShelf, markApproved, SAMPLE_FIGURES, type Shelf } from './fixtures/shelf';
import * as curvesMigration from '@/db/migrations/20261205200100_curves_frequencies_key';
import * as figuresMigration from '@/db/migrations/20261205200200_h_infinity_and_zero_frequency_names';
import * as labelsMigration from '@/db/migrations/20261205200300_model_labels_and_time_base';

let author: UserRow;
let reviewer: UserRow;

beforeAll(async () => {
  await migrateTestDatabase();
  author = await makeUser({ role: 'engineer', label: 'names-author' });
  reviewer = await makeUser({ role: 'reviewer', label: 'names-reviewer' });
});

afterAll(async () => {
  await closeDb();
});

async function run(migration: { up(knex: Knex): Promise<void> }): Promise<void> {
  await db().transaction(async (trx) => migration.up(trx));
}

const guardEnabled = async () =>
  (await db().raw(`SELECT tgenabled FROM pg_trigger WHERE tgname = 'reduced_versions_guard'`)).rows[0].tgenabled;

/** An approved version whose report, snapshot, matrices and analysis are then written in the earlier shape. */
async function oldShapeShelf(): Promise<Shelf & { figures: Record<string, unknown>; analysis: Record<string, unknown> }> {
  const shelf = await makeShelf(author.id);
  const [from] = curvesMigration.GRID_KEY;
  const figures: Record<string, unknown> = { ...SAMPLE_FIGURES };
  for (const [, now] of figuresMigration.FIGURE_KEYS) delete figures[now];
  figuresMigration.FIGURE_KEYS.forEach(([old], k) => (figures[old] = 1.5e-3 * (k + 1)));
  await db()('accuracy_reports')
    .where({ reduced_version_id: shelf.version.id })
    .update({ figures: JSON.stringify(figures), curves: JSON.stringify({ frequency: { [from]: [0.1, 1, 10], error: [1e-4, 2e-4, 3e-4] } }) });
  const [inputs, outputs, states] = labelsMigration.LABEL_KEYS.map(([old]) => old);
  const matrices = { ...FIRST_ORDER_LAG, [inputs]: ['burner'], [states]: ['x1'], [labelsMigration.TIME_KEY[0]]: 'ms' };
  await db()('reduced_versions').where({ id: shelf.version.id }).update({ matrices: JSON.stringify(matrices) }); // a draft: not frozen yet
  await markApproved(shelf.version.id, reviewer.id); // the snapshot takes the report's figures as they are
  const analysis: Record<string, unknown> = { states: 1, [inputs]: ['burner'], [outputs]: null, [labelsMigration.TIME_KEY[0]]: 'ms' };
  figuresMigration.ANALYSIS_KEYS.forEach(([old], k) => (analysis[old] = { marker: k }));
  await db()('analyses').insert({ source_version_id: shelf.sourceVersion.id, result: JSON.stringify(analysis), engine_version: 'test' });
  return { ...shelf, figures, analysis };
}

describe('names of our own: the migrations move what was stored before them', () => {
  it('renames the figure, analysis, curve, label and time-base keys, keeping every value and the registered digest', async () => {
    const s = await oldShapeShelf();
    const digestBefore = (await db()('reduced_versions').where({ id: s.version.id }).first('matrices_sha256')).matrices_sha256;

    await run(curvesMigration);
    await run(figuresMigration);
    await run(labelsMigration);
    expect(await guardEnabled()).toBe('O');

    const report = await db()('accuracy_reports').where({ reduced_version_id: s.version.id }).first('figures', 'curves');
    const version = await db()('reduced_versions').where({ id: s.version.id }).first('matrices', 'approved_figures', 'matrices_sha256', 'status');
    const analysis = (await db()('analyses').where({ source_version_id: s.sourceVersion.id }).first('result')).result;

    for (const [old, now] of figuresMigration.FIGURE_KEYS) {
      expect(report.figures).not.toHaveProperty(old);
      expect(report.figures[now]).toBe(s.figures[old]);
      expect(version.approved_figures.figures).not.toHaveProperty(old);
      expect(version.approved_figures.figures[now]).toBe(s.figures[old]);
    }
    expect(report.figures.errorBound).toBe(SAMPLE_FIGURES.errorBound); // the other figures untouched
    expect(report.curves.frequency).toEqual({ frequencies: [0.1, 1, 10], error: [1e-4, 2e-4, 3e-4] });

    for (const [old, now] of figuresMigration.ANALYSIS_KEYS) {
      expect(analysis).not.toHaveProperty(old);
      expect(analysis[now]).toEqual(s.analysis[old]);
    }
    expect(analysis.labels).toEqual({ inputs: ['burner'], outputs: null });
    expect(analysis.timeBase).toBe('ms');
    for (const [old] of labelsMigration.LABEL_KEYS) expect(analysis).not.toHaveProperty(old);

    expect(version.status).toBe('approved');
    expect(version.matrices).toEqual({ ...FIRST_ORDER_LAG, labels: { inputs: ['burner'], states: ['x1'] }, timeBase: 'ms' });
    expect(version.matrices_sha256).toBe(digestBefore);

    const column = await db().raw(`SELECT column_name FROM information_schema.columns WHERE table_name = 'pins' AND column_name LIKE 'max_relative%'`);
    expect(column.rows.map((r: { column_name: string }) => r.column_name)).toEqual(['max_relative_h_infinity_error']);
    const timeColumn = await db().raw(`SELECT column_name FROM information_schema.columns WHERE table_name = 'source_models' AND column_name LIKE 'time%'`);
    expect(timeColumn.rows.map((r: { column_name: string }) => r.column_name)).toEqual(['time_base']);
  });

  it('runs again without changing rows already in the new shape, and leaves the review guard on', async () => {
    const s = await makeShelf(author.id);
    await markApproved(s.version.id, reviewer.id);
    const before = await db()('reduced_versions').where({ id: s.version.id }).first('matrices', 'approved_figures');
    const reportBefore = await db()('accuracy_reports').where({ reduced_version_id: s.version.id }).first('figures', 'curves');
    await run(curvesMigration);
    await run(figuresMigration);
    await run(labelsMigration);
    expect(await db()('reduced_versions').where({ id: s.version.id }).first('matrices', 'approved_figures')).toEqual(before);
    expect(await db()('accuracy_reports').where({ reduced_version_id: s.version.id }).first('figures', 'curves')).toEqual(reportBefore);
    expect(await guardEnabled()).toBe('O');
    // The guard still refuses a change to the frozen matrices of an approved version.
    await expect(db()('reduced_versions').where({ id: s.version.id }).update({ matrices: JSON.stringify({ A: [[-2]], B: [[1]], C: [[1]], D: [[0]] }) })).rejects.toThrow(/frozen/);
  });
});
