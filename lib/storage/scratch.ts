// A worker's copies of stored files. The engine parses files from disk; a worker on another machine than the
// web server cannot see its folder, so it fetches each file it needs from the store into its own scratch
// folder (MODESHELF_SCRATCH_DIR) and the engine reads that copy. With the local store the file is on this
// machine already and is read where it is.
//
// Copies are kept by content address (<scratch>/sha256/ab/abcd…), so an analysis and the reductions after
// it fetch a model once. Each copy is streamed to a temporary file while its SHA-256 is computed, checked
// against the digest its key names, and only then renamed into place: a copy in the scratch folder is
// always whole and always the bytes that were uploaded.
import { createHash, randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, readdir, rename, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { scratchDir } from './config';
import { objectStore } from './index';
import { checkKey, sha256OfKey, StorageError, type ObjectStore } from './types';

export interface FetchOptions {
  readonly store?: ObjectStore;
  /** the scratch folder (default: MODESHELF_SCRATCH_DIR, see config.ts) */
  readonly dir?: string;
}

async function isFile(file: string): Promise<boolean> {
  try {
    return (await stat(file)).isFile();
  } catch {
    return false;
  }
}

/** A fetch's temporary file older than this was left by a thread that was stopped mid-download. */
const STALE_FETCH_MS = 6 * 60 * 60 * 1000;
const swept = new Set<string>();

/** Removes temporary files that stopped fetches left behind (once per folder per thread). */
async function sweepStaleFetches(tempDir: string): Promise<void> {
  if (swept.has(tempDir)) return;
  swept.add(tempDir);
  const now = Date.now();
  for (const name of await readdir(tempDir).catch(() => [] as string[])) {
    if (!name.endsWith('.fetch')) continue;
    const file = path.join(tempDir, name);
    const info = await stat(file).catch(() => null);
    if (info && now - info.mtimeMs > STALE_FETCH_MS) await rm(file, { force: true });
  }
}

/** A path on this machine holding the stored object's bytes. Throws StorageKeyNotFound, StorageError. */
export async function fetchToScratch(key: string, options: FetchOptions = {}): Promise<string> {
  const store = options.store ?? objectStore();
  const local = store.localPath(checkKey(key));
  if (local !== null) {
    // Ask the store, so a missing file gets the store's own message.
    await store.size(key);
    return local;
  }
  const root = path.resolve(/*turbopackIgnore: true*/ options.dir ?? scratchDir());
  const target = path.resolve(/*turbopackIgnore: true*/ root, key);
  if (!target.startsWith(root + path.sep)) throw new StorageError(`storage key outside the scratch folder: ${key}`);
  if (await isFile(target)) return target;

  const tempDir = path.join(root, 'tmp');
  await mkdir(tempDir, { recursive: true });
  await sweepStaleFetches(tempDir);
  const temp = path.join(tempDir, `${Date.now()}-${randomBytes(8).toString('hex')}.fetch`);
  const expected = sha256OfKey(key);
  const hash = createHash('sha256');
  try {
    const source = await store.getStream(key);
    const hashing = new Transform({
      transform(chunk: Buffer, _enc, done) {
        hash.update(chunk);
        done(null, chunk);
      },
    });
    await pipeline(source, hashing, createWriteStream(temp, { flags: 'wx' }));
    if (expected) {
      const actual = hash.digest('hex');
      if (actual !== expected) {
        throw new StorageError(`the stored file "${key}" does not match its digest (its bytes hash to ${actual}); it is damaged in ${store.location}`);
      }
    }
    await mkdir(path.dirname(target), { recursive: true });
    // Two fetches of the same key may race; both copies are whole and equal, the later rename wins.
    await rename(temp, target);
    return target;
  } catch (e) {
    await rm(temp, { force: true });
    throw e;
  }
}
