// Everything an export of one reduced-model version carries, read in one place: the registered matrices and
// their names and time unit, the recipe, the lineage back to the source version, and the accuracy report.
// The matrices' SHA-256 is recomputed from what the database returns and compared with the digest stored at
// registration (lib/checksums.ts), so an export can never hand out matrices that differ from the ones
// reviewed.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { preparedRows } from '@/lib/prepared';
import { ApiError } from '@/lib/http';
import { matricesSha256, type StateSpaceRows } from '@/lib/checksums';
import { newestSourceNumber, versionLineage } from '@/lib/version-lineage';

export type Rows = number[][];

export interface RegisteredMatrices {
  A: Rows;
  B: Rows;
  C: Rows;
  D: Rows;
}

export interface ExportSource {
  reducedModel: { id: string; slug: string; name: string; description: string };
  version: {
    id: string;
    number: number;
    status: string;
    order: number;
    statesKeptUnstable: number;
    engineVersion: string;
    registeredAt: Date;
  };
  matrices: RegisteredMatrices;
  /** The digest stored at registration, equal to the digest of `matrices` (checked on load). */
  matricesSha256: string;
  labels: { inputs: string[]; outputs: string[]; states: string[] };
  /** The time unit of A and B ("s" unless the model says otherwise). */
  timeBase: string;
  recipe: {
    method: string;
    order: number | null;
    tolerance: number | null;
    options: Record<string, unknown>;
    acceptance: Record<string, unknown> | null;
  };
  lineage: {
    sourceModel: { slug: string; name: string };
    sourceVersion: { number: number; checksum: string; format: string; states: number };
    newestSourceVersionNumber: number;
    upstreamChanged: boolean;
    /** The source version's checksum when the reduction ran (equal to its checksum unless data changed). */
    inputChecksum: string;
    predecessorVersionNumber: number | null;
  };
  accuracyReport: { figures: Record<string, unknown>; acceptancePassed: boolean | null } | null;
}

function labelsOr(stored: unknown, count: number, stem: string): string[] {
  if (Array.isArray(stored) && stored.length === count && stored.every((s) => typeof s === 'string')) return stored as string[];
  return Array.from({ length: count }, (_, i) => `${stem}${i + 1}`);
}

function rowsOf(value: unknown, key: string): Rows {
  if (!Array.isArray(value) || !value.every((r) => Array.isArray(r) && r.every((x) => typeof x === 'number' && Number.isFinite(x)))) {
    throw new ApiError(500, 'corrupt_version', `The stored matrix ${key} of this version is not an array of rows of finite numbers.`);
  }
  return value as Rows;
}

function checkShapes(m: RegisteredMatrices, label: string): void {
  const n = m.A.length;
  const inputs = m.B[0]?.length ?? 0;
  const outputs = m.C.length;
  const ok =
    n >= 1 &&
    m.A.every((r) => r.length === n) &&
    m.B.length === n &&
    m.B.every((r) => r.length === inputs) &&
    m.C.every((r) => r.length === n) &&
    m.D.length === outputs &&
    m.D.every((r) => r.length === inputs);
  if (!ok) throw new ApiError(500, 'corrupt_version', `The stored matrices of ${label} do not have the shapes of a state-space model.`);
}

/** The columns of an export beyond the lineage's own. */
interface ExportColumns {
  matrices: Record<string, unknown>;
  matricesSha256: string;
  statesKeptUnstable: number;
  engineVersion: string;
  inputChecksum: string;
  modelDescription: string;
  sourceChecksum: string;
  sourceFormat: string;
  sourceStates: number;
  sourceTimeBase: string | null;
  newestSourceNumber: number;
  recipeMethod: string;
  recipeOrder: number | null;
  recipeTolerance: number | null;
  recipeOptions: Record<string, unknown> | null;
  recipeAcceptance: Record<string, unknown> | null;
  reportFigures: Record<string, unknown> | null;
  reportAcceptancePassed: boolean | null;
  reportId: string | null;
  predecessorNumber: number | null;
}

/** Loads a version for export; throws a 404 when there is none with that id. */
export async function loadExportSource(versionId: string, trx: Knex | Knex.Transaction = db()): Promise<ExportSource> {
  const query = versionLineage<ExportColumns>(trx, {
    matrices: 'rv.matrices',
    matricesSha256: 'rv.matrices_sha256',
    statesKeptUnstable: 'rv.states_kept_unstable',
    engineVersion: 'rv.engine_version',
    inputChecksum: 'rv.input_checksum',
    modelDescription: 'rm.description',
    sourceChecksum: 'sv.checksum',
    sourceFormat: 'sv.format',
    sourceStates: 'sv.states',
    sourceTimeBase: 'sm.time_base',
    newestSourceNumber: newestSourceNumber(trx),
    recipeMethod: 'r.method',
    recipeOrder: 'r.order',
    recipeTolerance: 'r.tolerance',
    recipeOptions: 'r.options',
    recipeAcceptance: 'r.acceptance',
    reportFigures: 'ar.figures',
    reportAcceptancePassed: 'ar.acceptance_passed',
    reportId: 'ar.id',
    predecessorNumber: 'pv.number',
  }, ['recipe', 'report'])
    .leftJoin('reduced_versions as pv', 'pv.id', 'rv.predecessor_id')
    .where('rv.id', versionId)
    .limit(1);
  const [row] = await preparedRows<Awaited<typeof query>[number]>(query, trx);
  if (!row) throw new ApiError(404, 'not_found', 'That reduced model version was not found.');

  const m = row.matrices;
  const matrices: RegisteredMatrices = { A: rowsOf(m.A, 'A'), B: rowsOf(m.B, 'B'), C: rowsOf(m.C, 'C'), D: rowsOf(m.D, 'D') };
  checkShapes(matrices, `${row.reducedModelSlug} v${row.versionNumber}`);
  const digest = matricesSha256(matrices as StateSpaceRows);
  if (digest !== row.matricesSha256) {
    throw new ApiError(
      500,
      'checksum_mismatch',
      `The stored matrices of ${row.reducedModelSlug} v${row.versionNumber} no longer match the SHA-256 registered with them; nothing was exported. Tell an admin.`,
    );
  }
  const n = matrices.A.length;
  const inputs = matrices.B[0]?.length ?? 0;
  const outputs = matrices.C.length;
  const newest = Number(row.newestSourceNumber);
  const storedLabels = (m.labels !== null && typeof m.labels === 'object' ? m.labels : {}) as Record<string, unknown>;
  return {
    reducedModel: { id: row.reducedModelId, slug: row.reducedModelSlug, name: row.reducedModelName, description: row.modelDescription },
    version: {
      id: row.versionId,
      number: row.versionNumber,
      status: row.status,
      order: row.order,
      statesKeptUnstable: row.statesKeptUnstable,
      engineVersion: row.engineVersion,
      registeredAt: row.createdAt,
    },
    matrices,
    matricesSha256: digest,
    labels: {
      inputs: labelsOr(storedLabels.inputs, inputs, 'u'),
      outputs: labelsOr(storedLabels.outputs, outputs, 'y'),
      states: labelsOr(storedLabels.states, n, 'x'),
    },
    timeBase: typeof m.timeBase === 'string' && m.timeBase ? m.timeBase : row.sourceTimeBase || 's',
    recipe: {
      method: row.recipeMethod,
      order: row.recipeOrder,
      tolerance: row.recipeTolerance,
      options: row.recipeOptions ?? {},
      acceptance: row.recipeAcceptance ?? null,
    },
    lineage: {
      sourceModel: { slug: row.sourceModelSlug, name: row.sourceModelName },
      sourceVersion: { number: row.sourceVersionNumber, checksum: row.sourceChecksum, format: row.sourceFormat, states: row.sourceStates },
      newestSourceVersionNumber: newest,
      upstreamChanged: newest > row.sourceVersionNumber,
      inputChecksum: row.inputChecksum,
      predecessorVersionNumber: row.predecessorNumber ?? null,
    },
    accuracyReport: row.reportId ? { figures: row.reportFigures ?? {}, acceptancePassed: row.reportAcceptancePassed } : null,
  };
}
