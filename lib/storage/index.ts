// Storage of model files and other uploaded bytes behind one interface (types.ts): a local folder by default,
// S3-compatible object storage when MODESHELF_STORAGE=s3 (config.ts). Files are content-addressed: bytes
// with SHA-256 h live under the key sha256/h[0..2]/h in either store, so the same bytes uploaded twice are
// stored once and a key says what its bytes must hash to.
//
// The web server writes (putContent, after an upload's check); workers read (scratch.ts). No database and
// no Next.js here: this runs in worker threads too.
import { randomBytes } from 'node:crypto';
import { rm } from 'node:fs/promises';
import os from 'node:os';
import { storeConfig, type StoreConfig } from './config';
import { LocalStore } from './local';
import { S3Store } from './s3';
import { contentKey, StorageError, type ObjectStore } from './types';

export * from './types';
export { storeConfig, StorageConfigError, type StoreConfig } from './config';
export { LocalStore } from './local';
export { S3Store } from './s3';

export function createStore(config: StoreConfig): ObjectStore {
  return config.kind === 'local' ? new LocalStore(config.root) : new S3Store(config);
}

let cached: { signature: string; store: ObjectStore } | null = null;

/** The store the environment names (one client per configuration, reused). */
export function objectStore(): ObjectStore {
  const config = storeConfig();
  const signature = JSON.stringify(config);
  if (!cached || cached.signature !== signature) {
    if (cached?.store instanceof S3Store) void cached.store.close();
    cached = { signature, store: createStore(config) };
  }
  return cached.store;
}

export interface PlacedContent {
  readonly storageKey: string;
  /** true when this call put the object there (it was not stored before) */
  readonly placed: boolean;
}

/**
 * Puts a local file (whose SHA-256 the caller computed while receiving it) at its content address, moving
 * it: the file is gone afterwards either way. When those bytes are stored already nothing is written.
 */
export async function putContent(filePath: string, sha256: string, store: ObjectStore = objectStore()): Promise<PlacedContent> {
  const storageKey = contentKey(sha256);
  if (await store.exists(storageKey)) {
    await rm(filePath, { force: true });
    return { storageKey, placed: false };
  }
  await store.putFile(storageKey, filePath, { move: true });
  return { storageKey, placed: true };
}

/**
 * Writes, reads back and removes a small object, so a process can refuse to start against a store it
 * cannot use (a missing bucket, wrong credentials, missing permissions) instead of failing its first job.
 * Throws StorageError saying which step failed and where.
 */
export async function verifyStore(store: ObjectStore = objectStore()): Promise<void> {
  const key = `health/${os.hostname().replace(/[^A-Za-z0-9._-]/g, '-')}-${process.pid}-${randomBytes(4).toString('hex')}`;
  const body = `modeshelf store check ${new Date().toISOString()}`;
  const step = async <T>(what: string, fn: () => Promise<T>): Promise<T> => {
    try {
      return await fn();
    } catch (e) {
      throw new StorageError(`the store check could not ${what} ${store.location}: ${(e as Error).message}`, e);
    }
  };
  await step('write to', () => store.put(key, body));
  const back = await step('read from', () => store.get(key));
  await step('remove from', () => store.delete(key));
  if (back.toString('utf8') !== body) throw new StorageError(`the store check read back other bytes than it wrote in ${store.location}`);
}
