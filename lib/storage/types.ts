// The one interface every store offers (a local folder, local.ts; S3-compatible object storage, s3.ts), its
// errors and its keys. Keys are relative, slash-separated names such as "sha256/ab/abcd…"; both stores
// refuse anything else, so no key can reach outside its folder or bucket prefix.
import type { Readable } from 'node:stream';

export type StoreKind = 'local' | 's3';

export interface ObjectStore {
  readonly kind: StoreKind;
  /** Where the store is, in words, for messages and logs ("the folder /srv/uploads", "s3://bucket/prefix/ at …"). */
  readonly location: string;
  /** Writes a whole object from bytes or a stream. Readers never see a partly written object. */
  put(key: string, body: Buffer | string | Readable): Promise<void>;
  /**
   * Writes a whole object from a file on this machine. With `move`, the file is gone afterwards (the local
   * store renames it into place when it can; other stores remove it after the upload).
   */
  putFile(key: string, filePath: string, options?: { move?: boolean }): Promise<void>;
  /** The whole object in memory: for small objects only; use getStream for model files. */
  get(key: string): Promise<Buffer>;
  /** The object as a stream. Throws StorageKeyNotFound before returning when there is no such object. */
  getStream(key: string): Promise<Readable>;
  exists(key: string): Promise<boolean>;
  /** Size in bytes. Throws StorageKeyNotFound. */
  size(key: string): Promise<number>;
  /** Removes the object; removing one that is not there is not an error. */
  delete(key: string): Promise<void>;
  /** The object's path on this machine when the store is a folder here, else null (fetch it: scratch.ts). */
  localPath(key: string): string | null;
}

/** Asked for an object the store does not hold. */
export class StorageKeyNotFound extends Error {
  readonly code = 'storage_key_not_found';
  constructor(readonly key: string, location: string) {
    super(`the stored file "${key}" is not in ${location}`);
    this.name = 'StorageKeyNotFound';
  }
}

/** The store could not be reached or refused a request (not a missing key). */
export class StorageError extends Error {
  readonly code = 'storage_failed';
  constructor(message: string, readonly cause_?: unknown) {
    super(message);
    this.name = 'StorageError';
  }
}

const KEY = /^[A-Za-z0-9._-]+(\/[A-Za-z0-9._-]+)*$/;

/** Throws unless `key` is a relative slash-separated name with no "." or ".." part. */
export function checkKey(key: string): string {
  if (typeof key !== 'string' || key.length === 0 || key.length > 512 || !KEY.test(key) || key.split('/').some((p) => p === '.' || p === '..')) {
    throw new StorageError(`not a storage key: ${JSON.stringify(key)} (expected a relative name such as sha256/ab/abcd…)`);
  }
  return key;
}

const SHA256_HEX = /^[0-9a-f]{64}$/;

/** The content address of bytes with this SHA-256: sha256/<first two hex digits>/<all 64>. */
export function contentKey(sha256: string): string {
  if (!SHA256_HEX.test(sha256)) throw new StorageError(`not a SHA-256 hex digest: ${JSON.stringify(sha256)}`);
  return `sha256/${sha256.slice(0, 2)}/${sha256}`;
}

/** The digest a content key names, or null when the key is not a content address. */
export function sha256OfKey(key: string): string | null {
  const m = /^sha256\/([0-9a-f]{2})\/([0-9a-f]{64})$/.exec(key);
  return m && m[2].startsWith(m[1]) ? m[2] : null;
}
