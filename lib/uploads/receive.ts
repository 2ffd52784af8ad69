// Receiving a multipart upload in a route handler without ever holding it in memory: formidable parses the
// body as it arrives and each file part is streamed to a temporary file under <uploads>/tmp while its
// SHA-256 is computed on the same chunks. A body over the limit is cut off at the first chunk past it.
//
// Callers get the temporary files with their digests and either store them (store.ts) or call discard();
// on any refusal here every temporary file is already gone, so a failed upload leaves nothing behind.
//
// The route that calls this must not be matched by proxy.ts: Next.js buffers the whole body of a request
// that passes through the proxy (and cuts it at 10 MB), which would defeat the streaming here.
import { randomBytes } from 'node:crypto';
import { once } from 'node:events';
import { createWriteStream, mkdirSync, rmSync, type WriteStream } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import type { ReadableStream as NodeReadableStream } from 'node:stream/web';
import formidable, { errors as formidableErrors } from 'formidable';
import { ApiError } from '@/lib/http';
import { formatBytes, maxUploadBytes, uploadsDir } from './settings';

export interface ReceivedFile {
  /** the form field the file came in (e.g. "model", "A") */
  readonly field: string;
  /** the file name the browser sent, without any folder part */
  readonly originalName: string;
  readonly size: number;
  /** lower-case hex SHA-256 of the bytes, computed while they were streamed */
  readonly sha256: string;
  readonly tempPath: string;
}

export interface ReceivedUpload {
  readonly fields: Readonly<Record<string, string>>;
  readonly files: Readonly<Record<string, ReceivedFile>>;
  /** Removes the temporary files that were not stored. Safe to call more than once. */
  discard(): Promise<void>;
}

export interface ReceiveOptions {
  /** file fields this form has; a file in any other field is refused */
  readonly fileFields: readonly string[];
  /** largest body, all files together (default: the configured limit) */
  readonly maxBytes?: number;
}

// Text fields of our forms are short (a name, a description, tags); this keeps a stray huge field out.
const MAX_FIELDS_BYTES = 256 * 1024;

export function tempDir(): string {
  return path.join(uploadsDir(), 'tmp');
}

interface OpenTemp {
  path: string;
  stream: WriteStream;
}

async function closeAndRemove(temps: OpenTemp[]): Promise<void> {
  await Promise.all(
    temps.map(async (t) => {
      // Wait for the stream to close, so its file cannot be (re)created after the removal below.
      if (!t.stream.closed) {
        const closed = once(t.stream, 'close').catch(() => undefined);
        t.stream.destroy();
        await closed;
      }
      rmSync(t.path, { force: true });
    }),
  );
}

function tooLarge(limit: number, field: string | undefined): ApiError {
  return new ApiError(
    413,
    'upload_too_large',
    `The upload is larger than the limit of ${formatBytes(limit)}${field ? ` (while receiving "${field}")` : ''}. ` +
      'Split the model into its A, B, C, D files, or ask an admin to raise MODESHELF_MAX_UPLOAD_BYTES.',
    field,
  );
}

/** Parses a multipart/form-data request, streaming its files to temporary files. Throws ApiError. */
export async function receiveUpload(request: Request, options: ReceiveOptions): Promise<ReceivedUpload> {
  const limit = options.maxBytes ?? maxUploadBytes();
  const contentType = request.headers.get('content-type') ?? '';
  if (!/^multipart\/form-data\s*;/i.test(contentType)) {
    throw new ApiError(400, 'invalid_request', 'The upload must be sent as multipart/form-data (a form with files).');
  }
  const declared = Number(request.headers.get('content-length') ?? NaN);
  // The multipart framing adds a few hundred bytes per part; a body declared far over the limit is refused
  // before a single byte is read.
  if (Number.isFinite(declared) && declared > limit + 64 * 1024) throw tooLarge(limit, undefined);
  if (!request.body) throw new ApiError(400, 'invalid_request', 'The upload has no body.');

  const dir = tempDir();
  mkdirSync(dir, { recursive: true });
  const temps: OpenTemp[] = [];
  const tempOf = new Map<unknown, OpenTemp>();
  let currentField: string | undefined;

  const form = formidable({
    maxFiles: options.fileFields.length,
    maxFileSize: limit,
    maxTotalFileSize: limit,
    maxFieldsSize: MAX_FIELDS_BYTES,
    maxFields: 50,
    allowEmptyFiles: true,
    minFileSize: 0,
    hashAlgorithm: 'sha256',
    // formidable hands its file object to this handler, and the same object to the parse result.
    fileWriteStreamHandler: (file?: unknown) => {
      const tempPath = path.join(dir, `${Date.now()}-${randomBytes(8).toString('hex')}.part`);
      const stream = createWriteStream(tempPath, { flags: 'wx' });
      const temp = { path: tempPath, stream };
      temps.push(temp);
      tempOf.set(file, temp);
      return stream;
    },
  });
  form.on('fileBegin', (field) => {
    currentField = field;
  });

  const node = Readable.fromWeb(request.body as unknown as NodeReadableStream<Uint8Array>);
  // formidable reads the headers from the request object it is given. A body without a declared length
  // (a streamed request) must say it is chunked, or formidable takes it for an empty body.
  const headers = Object.fromEntries(request.headers.entries());
  if (headers['content-length'] === undefined && headers['transfer-encoding'] === undefined) headers['transfer-encoding'] = 'chunked';
  Object.assign(node, { headers });

  let parsed: [formidable.Fields, formidable.Files];
  try {
    parsed = await form.parse(node as unknown as Parameters<typeof form.parse>[0]);
  } catch (err) {
    node.destroy();
    await closeAndRemove(temps);
    const code = (err as { code?: number }).code;
    if (code === formidableErrors.biggerThanTotalMaxFileSize || code === formidableErrors.biggerThanMaxFileSize) {
      throw tooLarge(limit, currentField);
    }
    if (code === formidableErrors.maxFilesExceeded) {
      throw new ApiError(400, 'invalid_request', `Too many files: this form takes at most ${options.fileFields.length}.`);
    }
    if (code === formidableErrors.maxFieldsSizeExceeded || code === formidableErrors.maxFieldsExceeded) {
      throw new ApiError(400, 'invalid_request', 'The form fields are too large or too many.');
    }
    if (code === formidableErrors.aborted) {
      throw new ApiError(400, 'upload_aborted', 'The upload was interrupted before it finished; nothing was stored.');
    }
    throw new ApiError(400, 'invalid_request', `The upload could not be read as a multipart form: ${(err as Error).message}`);
  }

  const discard = () => closeAndRemove(temps);
  try {
    const [rawFields, rawFiles] = parsed;
    const fields: Record<string, string> = {};
    for (const [name, values] of Object.entries(rawFields)) {
      if (!values || values.length === 0) continue;
      if (values.length > 1) throw new ApiError(400, 'invalid_request', `${name}: give one value, not ${values.length}.`, name);
      fields[name] = values[0];
    }
    const files: Record<string, ReceivedFile> = {};
    for (const [field, list] of Object.entries(rawFiles)) {
      if (!list || list.length === 0) continue;
      if (!options.fileFields.includes(field)) {
        throw new ApiError(400, 'invalid_request', `"${field}" is not a file field of this form (expected ${options.fileFields.join(', ')}).`, field);
      }
      if (list.length > 1) throw new ApiError(400, 'invalid_request', `${field}: give one file, not ${list.length}.`, field);
      const f = list[0];
      const temp = tempOf.get(f);
      if (!temp) throw new Error(`receiveUpload: no temporary file was opened for field ${field}`);
      const originalName = path.basename(f.originalFilename || `${field}`);
      // A browser sends a file input that was left empty as a part with no file name and no bytes.
      if (!f.originalFilename && f.size === 0) {
        await closeAndRemove([temp]);
        temps.splice(temps.indexOf(temp), 1);
        continue;
      }
      files[field] = { field, originalName, size: f.size, sha256: String(f.hash), tempPath: temp.path };
    }
    return { fields, files, discard };
  } catch (err) {
    await discard();
    throw err;
  }
}
