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

/** Loads a version for export; throws a 404 when there is none with that id. */
export async function loadExportSource(versionId: string, trx: Knex | Knex.Transaction = db()): Promise<ExportSource> {
  const [row] = await preparedRows<Record<string, any>>(
    trx('reduced_versions as rv')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
    .join('source_models as sm', 'sm.id', 'sv.source_model_id')
    .join('recipes as r', 'r.id', 'rv.recipe_id')
    .leftJoin('accuracy_reports as ar', 'ar.reduced_version_id', 'rv.id')
    .leftJoin('reduced_versions as pv', 'pv.id', 'rv.predecessor_id')
    .where('rv.id', versionId)
    .limit(1)
    .select(
      'rv.*',
      'rm.slug as model_slug',
      'rm.name as model_name',
      'rm.description as model_description',
      'sv.number as source_number',
      'sv.checksum as source_checksum',
      'sv.format as source_format',
      'sv.states as source_states',
      'sm.slug as source_slug',
      'sm.name as source_name',
      'sm.time_base as source_time_base',
      trx.raw('(SELECT max(s2.number) FROM source_versions s2 WHERE s2.source_model_id = sm.id) AS newest_source_number'),
      'r.method as recipe_method',
      'r.order as recipe_order',
      'r.tolerance as recipe_tolerance',
      'r.options as recipe_options',
      'r.acceptance as recipe_acceptance',
      'ar.figures as report_figures',
      'ar.acceptance_passed as report_acceptance_passed',
      'ar.id as report_id',
      'pv.number as predecessor_number',
    ),
    trx,
  );
  if (!row) throw new ApiError(404, 'not_found', 'That reduced model version was not found.');

  const m = row.matrices as Record<string, unknown>;
  const matrices: RegisteredMatrices = { A: rowsOf(m.A, 'A'), B: rowsOf(m.B, 'B'), C: rowsOf(m.C, 'C'), D: rowsOf(m.D, 'D') };
  checkShapes(matrices, `${row.model_slug} v${row.number}`);
  const digest = matricesSha256(matrices as StateSpaceRows);
  if (digest !== row.matrices_sha256) {
    throw new ApiError(
      500,
      'checksum_mismatch',
      `The stored matrices of ${row.model_slug} v${row.number} no longer match the SHA-256 registered with them; nothing was exported. Tell an admin.`,
    );
  }
  const n = matrices.A.length;
  const inputs = matrices.B[0]?.length ?? 0;
  const outputs = matrices.C.length;
  const newest = Number(row.newest_source_number);
  const storedLabels = (m.labels !== null && typeof m.labels === 'object' ? m.labels : {}) as Record<string, unknown>;
  return {
    reducedModel: { id: row.reduced_model_id, slug: row.model_slug, name: row.model_name, description: row.model_description },
    version: {
      id: row.id,
      number: row.number,
      status: row.status,
      order: row.order,
      statesKeptUnstable: row.states_kept_unstable,
      engineVersion: row.engine_version,
      registeredAt: row.created_at,
    },
    matrices,
    matricesSha256: digest,
    labels: {
      inputs: labelsOr(storedLabels.inputs, inputs, 'u'),
      outputs: labelsOr(storedLabels.outputs, outputs, 'y'),
      states: labelsOr(storedLabels.states, n, 'x'),
    },
    timeBase: typeof m.timeBase === 'string' && m.timeBase ? m.timeBase : row.source_time_base || 's',
    recipe: {
      method: row.recipe_method,
      order: row.recipe_order,
      tolerance: row.recipe_tolerance,
      options: row.recipe_options ?? {},
      acceptance: row.recipe_acceptance ?? null,
    },
    lineage: {
      sourceModel: { slug: row.source_slug, name: row.source_name },
      sourceVersion: { number: row.source_number, checksum: row.source_checksum, format: row.source_format, states: row.source_states },
      newestSourceVersionNumber: newest,
      upstreamChanged: newest > row.source_number,
      inputChecksum: row.input_checksum,
      predecessorVersionNumber: row.predecessor_number ?? null,
    },
    accuracyReport: row.report_id ? { figures: row.report_figures ?? {}, acceptancePassed: row.report_acceptance_passed } : null,
  };
}
