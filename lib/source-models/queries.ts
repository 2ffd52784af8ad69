// The reads behind the model and version pages, the version and analysis reads of the jobs and the
// reduction routes, and the analysis the worker writes.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { notFound } from '@/lib/http';
import type { StoredModelFile } from '@/lib/engine-tasks/model-files';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { keptPolesOf, modalOrderFigures } from '@/lib/engine-tasks/order-figures';
import { statesInBand } from '@/reduction/mode-ranking';
import { latestJobFor } from '@/lib/jobs/jobs';
import { toModelView, type SourceModelRow, type SourceModelView, type SourceVersionRow, type SourceVersionView } from '@/lib/source-models/rows';

export async function findSourceModel(slug: string): Promise<SourceModelView | null> {
  const row = await db()<SourceModelRow>('source_models').where({ slug }).first();
  return row ? toModelView(row) : null;
}

async function versionViews(rows: (SourceVersionRow & { uploader_name: string; analysed: boolean })[]): Promise<SourceVersionView[]> {
  return Promise.all(
    rows.map(async (v) => ({
      id: v.id,
      number: v.number,
      checksum: v.checksum,
      format: v.format,
      files: v.files,
      states: v.states,
      inputs: v.inputs,
      outputs: v.outputs,
      nonzerosA: Number(v.nonzeros_a),
      notes: v.notes,
      uploadedBy: { id: v.uploaded_by, name: v.uploader_name },
      createdAt: new Date(v.created_at).toISOString(),
      analysed: v.analysed,
      job: await latestJobFor('analysis', 'source_version', v.id),
    })),
  );
}

function versionsQuery(trx: Knex = db()) {
  return trx('source_versions as sv')
    .join('users as u', 'u.id', 'sv.uploaded_by')
    .select('sv.*', 'u.name as uploader_name', trx.raw('EXISTS (SELECT 1 FROM analyses a WHERE a.source_version_id = sv.id) AS analysed'));
}

export async function listVersions(sourceModelId: string): Promise<SourceVersionView[]> {
  const rows = await versionsQuery().where('sv.source_model_id', sourceModelId).orderBy('sv.number', 'desc');
  return versionViews(rows);
}

export interface VersionPageData {
  model: SourceModelView;
  version: SourceVersionView;
  analysis: AnalysisRecord | null;
  latestNumber: number;
}

export async function getVersionPage(slug: string, number: number): Promise<VersionPageData | null> {
  const model = await findSourceModel(slug);
  if (!model) return null;
  const row = await versionsQuery().where({ 'sv.source_model_id': model.id, 'sv.number': number }).first();
  if (!row) return null;
  const [version] = await versionViews([row]);
  const analysisRow = await db()('analyses').where({ source_version_id: row.id }).first('result');
  const { max } = (await db()('source_versions').where({ source_model_id: model.id }).max('number as max').first()) as { max: number };
  return { model, version, analysis: analysisRow ? (analysisRow.result as AnalysisRecord) : null, latestNumber: max };
}

/** A version row by id, for the jobs and the reduction routes. */
export async function findSourceVersion(id: string, trx: Knex | Knex.Transaction = db()): Promise<(SourceVersionRow & { model: SourceModelRow }) | null> {
  const version = await trx<SourceVersionRow>('source_versions').where({ id }).first();
  if (!version) return null;
  const model = (await trx<SourceModelRow>('source_models').where({ id: version.source_model_id }).first())!;
  return { ...version, model };
}

/** The engine's view of a version's files: their keys in the store, which the worker fetches (lib/storage/scratch.ts). */
export function modelFilesOfVersion(version: Pick<SourceVersionRow, 'files'>): StoredModelFile[] {
  return version.files.map((f) => ({ role: f.role, name: f.name, storageKey: f.storageKey }));
}

export async function analysisOf(sourceVersionId: string, trx: Knex | Knex.Transaction = db()): Promise<AnalysisRecord | null> {
  const row = await trx('analyses').where({ source_version_id: sourceVersionId }).first('result');
  return row ? (row.result as AnalysisRecord) : null;
}

/**
 * Writes an analysis inside the job's finishing transaction. A second write for the same version (an
 * attempt that was presumed dead and finished after all) changes nothing.
 */
export async function writeAnalysis(trx: Knex.Transaction, sourceVersionId: string, record: AnalysisRecord): Promise<void> {
  await trx('analyses')
    .insert({ source_version_id: sourceVersionId, result: JSON.stringify(record), engine_version: record.engineVersion })
    .onConflict('source_version_id')
    .ignore();
}

/** The order slider's figures for modal truncation with the band rule (lib/engine-tasks/order-figures.ts). */
export async function bandOrderFigures(sourceVersionId: string, band: [number, number]) {
  const analysis = await analysisOf(sourceVersionId);
  if (!analysis) throw notFound('The analysis of this source version');
  const kept = keptPolesOf(analysis.poles, analysis.stabilityTolerance);
  return {
    figures: modalOrderFigures(analysis.modes, kept, { rule: 'band', band }, analysis.modalDominanceReliable),
    statesInBand: statesInBand(analysis.modes, band) + kept.unstable + kept.marginal,
  };
}
