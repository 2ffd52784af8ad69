// Source models and their numbered versions: the upload and its registration, the
// list the source-model table pages through, and the reads behind the model and version pages.
//
// Registering a version is one transaction (the model row for a first upload, the version row, its
// analysis job, the audit record), after the files have been streamed to disk, checked by the engine in a
// separate process, and streamed into the store at their content address (lib/storage). Anything that fails
// before the commit removes the objects this upload placed, so a refused upload leaves no row and no file
// behind.
//
// The files: one JSON model; or A, B, C with D and E optional; or a second-order model's mass, stiffness,
// B (force input) and C with damping and D optional; or all of them in one zip archive (field "archive",
// unpacked by the check's child process, lib/uploads/archive.ts, and then stored member by member exactly
// as if they had been sent one by one). A model above the engine's crossover, or with E, takes the sparse
// path and is checked without ever being made dense (lib/engine-tasks/validate-task.ts); its analysis job
// goes to the large worker class (lib/jobs/worker-class.ts).
import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import type { SessionUser } from '@/lib/auth';
import { receiveUpload, type ReceivedFile } from '@/lib/uploads/receive';
import { releaseFiles, storeFile, type StoredFile } from '@/lib/uploads/store';
import { checkArchiveInChildProcess, validateInChildProcess } from '@/lib/engine-tasks/validate-process';
import type { ValidationOutcome } from '@/lib/engine-tasks/validate-task';
import { tempDir } from '@/lib/uploads/receive';
import { maxUploadBytes } from '@/lib/uploads/settings';
import { rm } from 'node:fs/promises';
import path from 'node:path';
import { FILE_ROLES, type FileRole, type ModelFile, type SourceFormat, type StoredModelFile } from '@/lib/engine-tasks/model-files';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { keptPolesOf, modalOrderFigures } from '@/lib/engine-tasks/order-figures';
import { statesInBand } from '@/reduction/mode-ranking';
import { createJob, dispatchJob, latestJobFor, toJobView, type JobView } from '@/lib/jobs/jobs';

// ---------------------------------------------------------------------------------------------------
// Schemas: one base, the create and version forms derived from it (STYLE.md).

const tagList = z
  .string()
  .max(400, 'Tags must be at most 400 characters in all.')
  .transform((s) =>
    Array.from(
      new Set(
        s
          .split(',')
          .map((t) => t.trim().toLowerCase())
          .filter(Boolean),
      ),
    ),
  )
  .pipe(z.array(z.string().max(40, 'Each tag must be at most 40 characters.')).max(12, 'Give at most 12 tags.'));

const sourceModelBase = z.object({
  name: z.string({ error: 'Name is required.' }).trim().min(1, 'Name is required.').max(120, 'Name must be at most 120 characters.'),
  description: z.string().trim().max(4000, 'Description must be at most 4000 characters.').default(''),
  timeBase: z
    .string()
    .trim()
    .max(16, 'Time unit must be at most 16 characters.')
    .regex(/^[A-Za-zµ]*$/, 'Time unit must be a unit name such as s, ms or h.')
    .default(''),
  tags: tagList.default([]),
  notes: z.string().trim().max(2000, 'Notes must be at most 2000 characters.').default(''),
  sourceModelId: z.uuid({ error: 'The source model id must be a UUID.' }),
});

export const newSourceModelSchema = sourceModelBase.omit({ sourceModelId: true });
export const newVersionSchema = sourceModelBase.pick({ sourceModelId: true, notes: true });

export type NewSourceModelInput = z.infer<typeof newSourceModelSchema>;

// ---------------------------------------------------------------------------------------------------
// Rows and views

export interface SourceModelRow {
  id: string;
  name: string;
  slug: string;
  description: string;
  time_base: string;
  tags: string[];
  created_by: string;
  created_at: Date;
}

export interface StoredFileEntry {
  role: FileRole;
  name: string;
  size: number;
  sha256: string;
  storageKey: string;
}

export interface SourceVersionRow {
  id: string;
  source_model_id: string;
  number: number;
  checksum: string;
  format: SourceFormat;
  files: StoredFileEntry[];
  states: number;
  inputs: number;
  outputs: number;
  nonzeros_a: string | number;
  notes: string;
  uploaded_by: string;
  created_at: Date;
}

export interface SourceVersionView {
  id: string;
  number: number;
  checksum: string;
  format: SourceFormat;
  files: StoredFileEntry[];
  states: number;
  inputs: number;
  outputs: number;
  nonzerosA: number;
  notes: string;
  uploadedBy: { id: string; name: string };
  createdAt: string;
  analysed: boolean;
  job: JobView | null;
}

export interface SourceModelView {
  id: string;
  name: string;
  slug: string;
  description: string;
  timeBase: string;
  tags: string[];
  createdAt: string;
}

export function versionPath(slug: string, number: number): string {
  return `/source-models/${slug}/versions/${number}`;
}

function toModelView(row: SourceModelRow): SourceModelView {
  return {
    id: row.id,
    name: row.name,
    slug: row.slug,
    description: row.description,
    timeBase: row.time_base,
    tags: row.tags,
    createdAt: new Date(row.created_at).toISOString(),
  };
}

// ---------------------------------------------------------------------------------------------------
// Upload and registration

/** The checksum of a version: one file's digest, or the digest of its "role:digest" lines in role order. */
export function versionChecksum(files: readonly { role: FileRole; sha256: string }[]): string {
  if (files.length === 1) return files[0].sha256;
  const ordered = FILE_ROLES.flatMap((role) => files.filter((f) => f.role === role));
  const text = ordered.map((f) => `${f.role}:${f.sha256}`).join('\n');
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

export function slugFromName(name: string): string {
  const base = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return base || 'model';
}

async function uniqueSlug(trx: Knex.Transaction, table: string, name: string): Promise<string> {
  const base = slugFromName(name);
  const taken = new Set(
    (await trx(table).where('slug', base).orWhere('slug', 'like', `${base}-%`).pluck('slug')) as string[],
  );
  if (!taken.has(base)) return base;
  for (let k = 2; ; k++) if (!taken.has(`${base}-${k}`)) return `${base}-${k}`;
}

/** The form's file fields: every role a model file can have, and one zip archive holding them. */
const FILE_FIELDS: readonly (FileRole | 'archive')[] = [...FILE_ROLES, 'archive'];
const SECOND_ORDER_FIELDS = ['mass', 'damping', 'stiffness'] as const;

/**
 * Which uploaded files make the model: one JSON; A, B, C (D, E optional); mass, stiffness, B, C (damping, D
 * optional); or one archive. Throws ApiError naming the field.
 */
function modelFilesOf(files: Readonly<Record<string, ReceivedFile>>): ReceivedFile[] {
  const given = FILE_FIELDS.filter((f) => files[f]);
  if (given.length === 0) {
    throw new ApiError(
      400,
      'missing_file',
      'Choose the model file (JSON), the matrix files A, B, C (D and E optional), a second-order model’s M, K, B, C (its damping D optional) or a zip archive of them.',
      'model',
    );
  }
  if (files.archive && given.length > 1) {
    throw new ApiError(400, 'invalid_request', 'Give either a zip archive or the model’s files one by one, not both.', 'archive');
  }
  if (files.model && given.length > 1) {
    throw new ApiError(400, 'invalid_request', 'Give either one JSON model file or the matrix files, not both.', 'model');
  }
  if (files.archive) {
    if (path.extname(files.archive.originalName).toLowerCase() !== '.zip') {
      throw new ApiError(400, 'invalid_request', `${files.archive.originalName}: the archive must be a .zip file.`, 'archive');
    }
    return [files.archive];
  }
  if (files.model) return [files.model];
  if (SECOND_ORDER_FIELDS.some((f) => files[f])) {
    for (const f of ['A', 'E'] as const) {
      if (files[f]) throw new ApiError(400, 'invalid_request', `A second-order model (M, D, K) takes no ${f} file: its first-order form is made from M, D and K.`, f);
    }
    for (const [f, words] of [
      ['mass', 'mass matrix M'],
      ['stiffness', 'stiffness matrix K'],
      ['B', 'force input matrix B'],
      ['C', 'output matrix C'],
    ] as const) {
      if (!files[f]) throw new ApiError(400, 'missing_file', `The ${words} file is missing (a second-order model needs M, K, B and C; its damping D is optional).`, f);
    }
  } else {
    for (const role of ['A', 'B', 'C'] as const) {
      if (!files[role]) throw new ApiError(400, 'missing_file', `The ${role} matrix file is missing (A, B and C are required; D and E are optional).`, role);
    }
  }
  return given.map((f) => files[f]);
}

/** A file of the model, received as it was sent or unpacked from an archive: what is checked, stored and registered. */
interface ModelPart {
  role: FileRole;
  name: string;
  size: number;
  sha256: string;
  tempPath: string;
}

/**
 * The model's files, checked by the engine in a child process: the received files as they are, or the
 * members of the received archive (unpacked into a folder of their own, returned for removal).
 */
async function checkedParts(received: ReceivedFile[]): Promise<{ parts: ModelPart[]; check: ValidationOutcome; folder: string | null }> {
  const failed = (field: string) => (e: Error) => {
    throw new ApiError(422, 'check_failed', `The model could not be checked: ${e.message}`, field);
  };
  if (received.length === 1 && received[0].field === 'archive') {
    const archive = received[0];
    const answer = await checkArchiveInChildProcess({ path: archive.tempPath, name: archive.originalName }, tempDir(), maxUploadBytes()).catch(failed('archive'));
    if (!answer.archive.ok) {
      const e = answer.archive.error;
      throw new ApiError(e.code === 'archive_too_large' ? 413 : 422, `invalid_archive_${e.code}`, e.message, 'archive');
    }
    const parts = answer.archive.members.map((m) => ({ role: m.role, name: m.name, size: m.size, sha256: m.sha256, tempPath: m.path }));
    return { parts, check: answer.check!, folder: parts.length > 0 ? path.dirname(parts[0].tempPath) : null };
  }
  const parts = received.map((f) => ({ role: f.field as FileRole, name: f.originalName, size: f.size, sha256: f.sha256, tempPath: f.tempPath }));
  const check = await validateInChildProcess(parts.map((f): ModelFile => ({ role: f.role, name: f.name, path: f.tempPath }))).catch(failed(received[0].field));
  return { parts, check, folder: null };
}

export interface RegisteredVersion {
  sourceModel: SourceModelView;
  version: { id: string; number: number; checksum: string; states: number; inputs: number; outputs: number };
  job: JobView;
  url: string;
}

async function storageKeyInUse(key: string): Promise<boolean> {
  const row = await db()('source_versions')
    .whereRaw(`files @> ?::jsonb`, [JSON.stringify([{ storageKey: key }])])
    .first('id');
  return Boolean(row);
}

function fieldErrorFromZod(err: z.ZodError): ApiError {
  const issue = err.issues[0];
  const field = issue?.path.map(String).join('.') || undefined;
  return new ApiError(400, 'invalid_request', field ? `${field}: ${issue.message}` : issue?.message ?? 'The form is not valid.', field);
}

/**
 * Receives a multipart upload (a new source model, or a new version when `sourceModelId` is given),
 * checks it, stores it and registers it with its analysis job. Throws ApiError with the field at fault.
 */
export async function registerUpload(request: Request, user: SessionUser): Promise<RegisteredVersion> {
  const upload = await receiveUpload(request, { fileFields: FILE_FIELDS });
  const placed: StoredFile[] = [];
  let archiveFolder: string | null = null;
  try {
    const isNewVersion = Boolean(upload.fields.sourceModelId);
    const parsed = isNewVersion ? newVersionSchema.safeParse(upload.fields) : newSourceModelSchema.safeParse(upload.fields);
    if (!parsed.success) throw fieldErrorFromZod(parsed.error);
    const received = modelFilesOf(upload.files);

    let existingModel: SourceModelRow | undefined;
    if (isNewVersion) {
      existingModel = await db()<SourceModelRow>('source_models').where({ id: upload.fields.sourceModelId }).first();
      if (!existingModel) throw new ApiError(404, 'not_found', 'The source model to add a version to was not found.', 'sourceModelId');
    }

    // Files sent one by one are refused as a duplicate before the check; an archive's members once unpacked.
    if (existingModel && received[0].field !== 'archive') {
      await refuseDuplicate(existingModel, versionChecksum(received.map((f) => ({ role: f.field as FileRole, sha256: f.sha256 }))), received[0].field);
    }
    const checked = await checkedParts(received);
    archiveFolder = checked.folder;
    const { parts, check } = checked;
    const checksum = versionChecksum(parts);
    if (existingModel && received[0].field === 'archive') await refuseDuplicate(existingModel, checksum, 'archive');
    if (!check.ok) {
      const field = received[0].field === 'archive' ? 'archive' : FILE_FIELDS.includes(check.error.field as FileRole) ? check.error.field : received[0].field;
      const inArchive = received[0].field === 'archive' && check.error.field !== 'archive' ? ` (in ${received[0].originalName}: ${check.error.field})` : '';
      throw new ApiError(422, `invalid_model_${check.error.code}`, `${check.error.message}${inArchive}`, field);
    }

    for (const f of parts) placed.push(await storeFile(f.tempPath, f.sha256, received[0].field === 'archive' ? 'archive' : f.role));
    const files: StoredFileEntry[] = parts.map((f, k) => ({
      role: f.role,
      name: f.name,
      size: f.size,
      sha256: f.sha256,
      storageKey: placed[k].storageKey,
    }));

    const registered = await db().transaction(async (trx) => {
      let model: SourceModelRow;
      if (existingModel) {
        // Lock the model row: two versions uploaded at once get consecutive numbers, not the same one.
        model = (await trx<SourceModelRow>('source_models').where({ id: existingModel.id }).forUpdate().first())!;
      } else {
        const input = parsed.data as NewSourceModelInput;
        [model] = await trx<SourceModelRow>('source_models')
          .insert({
            name: input.name,
            slug: await uniqueSlug(trx, 'source_models', input.name),
            description: input.description,
            time_base: input.timeBase || check.model.timeBase || 's',
            tags: input.tags,
            created_by: user.id,
          })
          .returning('*');
      }
      const { max } = (await trx('source_versions').where({ source_model_id: model.id }).max('number as max').first()) as { max: number | null };
      const number = (max ?? 0) + 1;
      const [version] = await trx<SourceVersionRow>('source_versions')
        .insert({
          source_model_id: model.id,
          number,
          checksum,
          format: check.model.format,
          files: JSON.stringify(files) as unknown as StoredFileEntry[],
          states: check.model.states,
          inputs: check.model.inputs,
          outputs: check.model.outputs,
          nonzeros_a: check.model.nonzerosA,
          notes: (parsed.data as { notes: string }).notes,
          uploaded_by: user.id,
        })
        .returning('*');
      const job = await createJob(trx, {
        kind: 'analysis',
        subjectType: 'source_version',
        subjectId: version.id,
        // The engine path the check found: the worker's memory estimate depends on it (lib/jobs/memory-budget.ts).
        payload: { sourceVersionId: version.id, enginePath: check.model.path },
        createdBy: user.id,
      });
      await recordAudit(trx, {
        actorId: user.id,
        action: existingModel ? 'source_version.uploaded' : 'source_model.created',
        subjectType: 'source_version',
        subjectId: version.id,
        details: { sourceModel: model.slug, number, checksum, states: version.states, format: version.format },
      });
      return { model, version, job };
    });

    await dispatchJob(registered.job.id);
    return {
      sourceModel: toModelView(registered.model),
      version: {
        id: registered.version.id,
        number: registered.version.number,
        checksum,
        states: registered.version.states,
        inputs: registered.version.inputs,
        outputs: registered.version.outputs,
      },
      job: toJobView(registered.job),
      url: versionPath(registered.model.slug, registered.version.number),
    };
  } catch (err) {
    await releaseFiles(placed, storageKeyInUse);
    throw translateConstraint(err, upload.files);
  } finally {
    await upload.discard();
    // An archive's unpacked members not stored (a refusal) go with their folder.
    if (archiveFolder) await rm(archiveFolder, { recursive: true, force: true });
  }
}

async function refuseDuplicate(model: SourceModelRow, checksum: string, field: string): Promise<void> {
  const existing = await db()('source_versions').where({ source_model_id: model.id, checksum }).first('number');
  if (existing) {
    const url = versionPath(model.slug, existing.number);
    throw new ApiError(
      409,
      'duplicate_version',
      `These files are already version v${existing.number} of “${model.name}” (same SHA-256); nothing was added.`,
      field,
      url,
    );
  }
}

/** Two identical uploads racing past refuseDuplicate meet the unique constraint; say the same thing. */
function translateConstraint(err: unknown, files: Readonly<Record<string, ReceivedFile>>): unknown {
  const pg = err as { code?: string; constraint?: string };
  if (pg?.code === '23505' && pg.constraint === 'source_versions_source_model_id_checksum_unique') {
    const field = FILE_FIELDS.find((f) => files[f]) ?? 'model';
    return new ApiError(409, 'duplicate_version', 'These files were just uploaded as a version of this model; nothing was added.', field);
  }
  return err;
}

// ---------------------------------------------------------------------------------------------------
// The list (server-side sorted, filtered and paginated for the TanStack table)

export const SOURCE_MODEL_SORTS = ['name', 'latestVersion', 'states', 'inputs', 'outputs', 'stiffnessRatio', 'stable', 'uploadedBy', 'uploadedAt'] as const;
export type SourceModelSort = (typeof SOURCE_MODEL_SORTS)[number];

export const sourceModelListSchema = z.object({
  q: z.string().trim().max(100, 'The filter must be at most 100 characters.').default(''),
  stable: z.enum(['', 'yes', 'no'], { error: 'stable must be yes, no or empty.' }).default(''),
  sort: z.enum(SOURCE_MODEL_SORTS, { error: `sort must be one of ${SOURCE_MODEL_SORTS.join(', ')}.` }).default('uploadedAt'),
  dir: z.enum(['asc', 'desc'], { error: 'dir must be asc or desc.' }).default('desc'),
  page: z.coerce.number({ error: 'page must be a number.' }).int('page must be a whole number.').min(0, 'page must be 0 or more.').default(0),
  pageSize: z.coerce.number({ error: 'pageSize must be a number.' }).int('pageSize must be a whole number.').min(5, 'pageSize must be at least 5.').max(100, 'pageSize must be at most 100.').default(20),
});
export type SourceModelListQuery = z.infer<typeof sourceModelListSchema>;

export interface SourceModelListRow {
  id: string;
  name: string;
  slug: string;
  tags: string[];
  latestVersion: number;
  states: number;
  inputs: number;
  outputs: number;
  stiffnessRatio: number | null;
  stable: boolean | null;
  uploadedBy: string;
  uploadedAt: string;
}

const SORT_SQL: Record<SourceModelSort, string> = {
  name: 'lower(sm.name)',
  latestVersion: 'l.number',
  states: 'l.states',
  inputs: 'l.inputs',
  outputs: 'l.outputs',
  stiffnessRatio: 'stiffness_ratio',
  stable: 'stable',
  uploadedBy: 'lower(l.uploader_name)',
  uploadedAt: 'l.created_at',
};

export async function listSourceModels(query: SourceModelListQuery): Promise<{ rows: SourceModelListRow[]; total: number }> {
  const where: string[] = [];
  const bindings: (string | number)[] = [];
  if (query.q) {
    where.push(`(sm.name ILIKE ? OR sm.description ILIKE ? OR EXISTS (SELECT 1 FROM unnest(sm.tags) t WHERE t ILIKE ?) OR l.uploader_name ILIKE ?)`);
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    bindings.push(like, like, like, like);
  }
  if (query.stable) where.push(query.stable === 'yes' ? `(a.result->>'stable')::boolean IS TRUE` : `(a.result->>'stable')::boolean IS FALSE`);
  const base = `
    FROM source_models sm
    JOIN LATERAL (
      SELECT sv.id, sv.number, sv.states, sv.inputs, sv.outputs, sv.created_at, u.name AS uploader_name
      FROM source_versions sv JOIN users u ON u.id = sv.uploaded_by
      WHERE sv.source_model_id = sm.id ORDER BY sv.number DESC LIMIT 1
    ) l ON TRUE
    LEFT JOIN analyses a ON a.source_version_id = l.id
    ${where.length ? `WHERE ${where.join(' AND ')}` : ''}`;
  const count = await db().raw(`SELECT count(*)::int AS total ${base}`, bindings);
  const total = count.rows[0]?.total ?? 0;
  const order = `${SORT_SQL[query.sort]} ${query.dir === 'asc' ? 'ASC' : 'DESC'} NULLS LAST, lower(sm.name) ASC, sm.id`;
  const result = await db().raw(
    `SELECT sm.id, sm.name, sm.slug, sm.tags, l.number, l.states, l.inputs, l.outputs, l.created_at, l.uploader_name,
            CASE WHEN jsonb_typeof(a.result->'stiffnessRatio') = 'number' THEN (a.result->>'stiffnessRatio')::float8 END AS stiffness_ratio,
            (a.result->>'stable')::boolean AS stable
     ${base} ORDER BY ${order} LIMIT ? OFFSET ?`,
    [...bindings, query.pageSize, query.page * query.pageSize],
  );
  const rows: SourceModelListRow[] = result.rows.map((r: Record<string, unknown>) => ({
    id: r.id as string,
    name: r.name as string,
    slug: r.slug as string,
    tags: r.tags as string[],
    latestVersion: r.number as number,
    states: r.states as number,
    inputs: r.inputs as number,
    outputs: r.outputs as number,
    stiffnessRatio: (r.stiffness_ratio as number | null) ?? null,
    stable: (r.stable as boolean | null) ?? null,
    uploadedBy: r.uploader_name as string,
    uploadedAt: new Date(r.created_at as string).toISOString(),
  }));
  return { rows, total };
}

// ---------------------------------------------------------------------------------------------------
// Model and version pages

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
