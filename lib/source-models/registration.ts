// The upload of a source model or of a new version, and its registration.
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
import { rm } from 'node:fs/promises';
import path from 'node:path';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, validationError } from '@/lib/http';
import { uniqueSlug } from '@/lib/slug';
import type { SessionUser } from '@/lib/auth';
import { receiveUpload, tempDir, type ReceivedFile } from '@/lib/uploads/receive';
import { releaseFiles, storeFile, type StoredFile } from '@/lib/uploads/store';
import { maxUploadBytes } from '@/lib/uploads/settings';
import { checkArchiveInChildProcess, validateInChildProcess } from '@/lib/engine-tasks/validate-process';
import type { ValidationOutcome } from '@/lib/engine-tasks/validate-task';
import { FILE_ROLES, type FileRole, type ModelFile } from '@/lib/engine-tasks/model-files';
import { createJob, dispatchJob, toJobView, type JobView } from '@/lib/jobs/jobs';
import { newSourceModelSchema, newVersionSchema, type NewSourceModelInput } from '@/lib/source-models/schemas';
import { toModelView, versionPath, type SourceModelRow, type SourceModelView, type SourceVersionRow, type StoredFileEntry } from '@/lib/source-models/rows';

/** The checksum of a version: one file's digest, or the digest of its "role:digest" lines in role order. */
export function versionChecksum(files: readonly { role: FileRole; sha256: string }[]): string {
  if (files.length === 1) return files[0].sha256;
  const ordered = FILE_ROLES.flatMap((role) => files.filter((f) => f.role === role));
  const text = ordered.map((f) => `${f.role}:${f.sha256}`).join('\n');
  return createHash('sha256').update(text, 'utf8').digest('hex');
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
    if (!parsed.success) throw validationError(parsed.error);
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
            slug: await uniqueSlug(trx, 'source_models', input.name, 'model'),
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
