// Storage of model files and other uploaded bytes behind one interface (types.ts): a local folder by default,
// S3-compatible object storage when MODESHELF_STORAGE=s3 (config.ts). Files are content-addressed: bytes
// with SHA-256 h live under the key sha256/h[0..2]/h in either store, so the same bytes uploaded twice are
// stored once and a key says what its bytes must hash to.
//
// The web server writes (putContent, after an upload's check); workers read (scratch.ts). No database and
// no Next.js here: this runs in worker threads too.
import { rm } from 'node:fs/promises';
import { storeConfig, type StoreConfig } from './config';
import { LocalStore } from './local';
import { S3Store } from './s3';
import { contentKey, type ObjectStore } from './types';

export * from './types';
export { storeConfig, scratchDir, StorageConfigError, type StoreConfig } from './config';
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
