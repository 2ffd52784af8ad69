// Which store holds model files, read from the environment on every call (a test may switch a process to
// another store before its next upload). The local folder is the default and needs nothing set up.
//
//   MODESHELF_STORAGE                 local (default) or s3
//   MODESHELF_UPLOADS_DIR             the local store's folder (default <repo>/uploads; lib/uploads/settings.ts).
//                                     With s3 it still holds the web server's temporary upload files.
//   MODESHELF_S3_BUCKET               the bucket (required with s3; it must exist)
//   MODESHELF_S3_ENDPOINT             an S3-compatible endpoint, e.g. http://10.0.0.5:9000 (default: the
//                                     provider's own endpoint for the region)
//   MODESHELF_S3_REGION               region (default AWS_REGION, else us-east-1)
//   MODESHELF_S3_ACCESS_KEY_ID,
//   MODESHELF_S3_SECRET_ACCESS_KEY    credentials, both or neither (neither: the SDK's usual sources,
//                                     AWS_ACCESS_KEY_ID etc., a profile or an instance role)
//   MODESHELF_S3_FORCE_PATH_STYLE     true or false: address the bucket as <endpoint>/<bucket> (most
//                                     self-hosted stores) rather than <bucket>.<endpoint>; default true
//                                     when MODESHELF_S3_ENDPOINT is set, false otherwise
//   MODESHELF_S3_PREFIX               a folder in the bucket for our keys, e.g. modeshelf/ (default none)
//   MODESHELF_SCRATCH_DIR             a worker's folder for files fetched from an object store (default
//                                     <system temp>/modeshelf-scratch; see scratch.ts)
import os from 'node:os';
import path from 'node:path';
import { uploadsDir } from '../uploads/settings';

export interface LocalStoreConfig {
  readonly kind: 'local';
  readonly root: string;
}

export interface S3StoreConfig {
  readonly kind: 's3';
  readonly bucket: string;
  readonly endpoint: string | undefined;
  readonly region: string;
  readonly credentials: { accessKeyId: string; secretAccessKey: string } | undefined;
  readonly forcePathStyle: boolean;
  readonly prefix: string;
}

export type StoreConfig = LocalStoreConfig | S3StoreConfig;

/** A setting that cannot be used; the message names the variable. */
export class StorageConfigError extends Error {
  constructor(readonly variable: string, message: string) {
    super(`${variable}: ${message}`);
    this.name = 'StorageConfigError';
  }
}

function env(name: string): string | undefined {
  const value = process.env[name];
  return value === undefined || value.trim() === '' ? undefined : value.trim();
}

function flag(name: string, fallback: boolean): boolean {
  const raw = env(name);
  if (raw === undefined) return fallback;
  if (/^(true|1|yes)$/i.test(raw)) return true;
  if (/^(false|0|no)$/i.test(raw)) return false;
  throw new StorageConfigError(name, `give true or false, not "${raw}"`);
}

export function storeConfig(): StoreConfig {
  const kind = (env('MODESHELF_STORAGE') ?? 'local').toLowerCase();
  if (kind === 'local') return { kind: 'local', root: uploadsDir() };
  if (kind !== 's3') throw new StorageConfigError('MODESHELF_STORAGE', `give local or s3, not "${process.env.MODESHELF_STORAGE}"`);

  const bucket = env('MODESHELF_S3_BUCKET');
  if (!bucket) throw new StorageConfigError('MODESHELF_S3_BUCKET', 'set it to the bucket that holds the model files when MODESHELF_STORAGE=s3');
  // S3's bucket naming rules (3–63 characters of lower-case letters, digits, dots and hyphens).
  if (!/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/.test(bucket)) {
    throw new StorageConfigError('MODESHELF_S3_BUCKET', `"${bucket}" is not a valid bucket name (3–63 lower-case letters, digits, dots, hyphens)`);
  }
  const endpoint = env('MODESHELF_S3_ENDPOINT');
  if (endpoint !== undefined) {
    let url: URL;
    try {
      url = new URL(endpoint);
    } catch {
      throw new StorageConfigError('MODESHELF_S3_ENDPOINT', `"${endpoint}" is not a URL (e.g. http://127.0.0.1:9000)`);
    }
    if (url.protocol !== 'http:' && url.protocol !== 'https:') {
      throw new StorageConfigError('MODESHELF_S3_ENDPOINT', `"${endpoint}" must start with http:// or https://`);
    }
  }
  const accessKeyId = env('MODESHELF_S3_ACCESS_KEY_ID');
  const secretAccessKey = env('MODESHELF_S3_SECRET_ACCESS_KEY');
  if (Boolean(accessKeyId) !== Boolean(secretAccessKey)) {
    const missing = accessKeyId ? 'MODESHELF_S3_SECRET_ACCESS_KEY' : 'MODESHELF_S3_ACCESS_KEY_ID';
    throw new StorageConfigError(missing, 'give both MODESHELF_S3_ACCESS_KEY_ID and MODESHELF_S3_SECRET_ACCESS_KEY, or neither');
  }
  let prefix = env('MODESHELF_S3_PREFIX') ?? '';
  if (prefix) {
    prefix = prefix.replace(/^\/+/, '').replace(/\/*$/, '/');
    if (!/^[A-Za-z0-9._\-/]+$/.test(prefix) || prefix.split('/').some((part) => part === '..' || part === '.')) {
      throw new StorageConfigError('MODESHELF_S3_PREFIX', `"${prefix}" may hold only letters, digits, ".", "_", "-" and "/" (no "." or ".." parts)`);
    }
  }
  return {
    kind: 's3',
    bucket,
    endpoint,
    region: env('MODESHELF_S3_REGION') ?? env('AWS_REGION') ?? 'us-east-1',
    credentials: accessKeyId && secretAccessKey ? { accessKeyId, secretAccessKey } : undefined,
    forcePathStyle: flag('MODESHELF_S3_FORCE_PATH_STYLE', endpoint !== undefined),
    prefix,
  };
}

/** A worker's folder for files fetched from the store (per worker when each worker sets its own). */
export function scratchDir(): string {
  return path.resolve(/*turbopackIgnore: true*/ env('MODESHELF_SCRATCH_DIR') ?? path.join(os.tmpdir(), 'modeshelf-scratch'));
}
