// Content-addressed storage of uploaded files: a file with SHA-256 h lives at <uploads>/sha256/h[0..2]/h,
// and its storage key (kept in source_versions.files) is that path relative to the uploads folder. The same
// bytes uploaded twice, for two models, are stored once.
//
// Registration calls storeFile before its transaction and, when the transaction fails, releaseFiles for
// the files it placed itself; a file another version already refers to is never removed.
import { existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import path from 'node:path';
import { uploadsDir } from './settings';

const SHA256_HEX = /^[0-9a-f]{64}$/;

export function storageKeyFor(sha256: string): string {
  if (!SHA256_HEX.test(sha256)) throw new Error(`not a SHA-256 hex digest: ${sha256}`);
  return `sha256/${sha256.slice(0, 2)}/${sha256}`;
}

/** Absolute path of a storage key; refuses keys that would leave the uploads folder. */
export function storagePath(storageKey: string): string {
  const root = uploadsDir();
  const full = path.resolve(root, storageKey);
  if (!full.startsWith(root + path.sep)) throw new Error(`storage key outside the uploads folder: ${storageKey}`);
  return full;
}

export interface StoredFile {
  readonly storageKey: string;
  /** true when this call put the file there (it was not stored before) */
  readonly placed: boolean;
}

/** Moves a received temporary file to its content address (or drops it when those bytes are stored already). */
export function storeFile(tempPath: string, sha256: string): StoredFile {
  const storageKey = storageKeyFor(sha256);
  const target = storagePath(storageKey);
  if (existsSync(target)) {
    rmSync(tempPath, { force: true });
    return { storageKey, placed: false };
  }
  mkdirSync(path.dirname(target), { recursive: true });
  // Same filesystem (both under the uploads folder), so the rename is atomic: a reader never sees half a file.
  renameSync(tempPath, target);
  return { storageKey, placed: true };
}

/** Removes stored files this request placed, when its registration did not go through. */
export function releaseFiles(files: readonly StoredFile[], stillReferenced: (storageKey: string) => boolean): void {
  for (const f of files) {
    if (f.placed && !stillReferenced(f.storageKey)) rmSync(storagePath(f.storageKey), { force: true });
  }
}
