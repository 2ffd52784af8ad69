// Putting checked uploads into the store (lib/storage): a file with SHA-256 h gets the key sha256/h[0..2]/h
// (kept in source_versions.files and job payloads), in the local folder <uploads>/sha256/ab/abcd… by default
// or in the S3-compatible bucket when MODESHELF_STORAGE=s3. The same bytes uploaded twice, for two models,
// are stored once.
//
// Registration calls storeFile after the engine's check and before its transaction and, when the transaction
// fails, releaseFiles for the objects it placed itself; an object another record refers to is never removed.
import { ApiError } from '@/lib/http';
import { LocalStore, objectStore, putContent, StorageError } from '@/lib/storage';
import { uploadsDir } from './settings';

/**
 * The path of a storage key in the local folder (MODESHELF_UPLOADS_DIR). Only the local store keeps files
 * there; code that reads stored files goes through lib/storage (workers: lib/storage/scratch.ts).
 */
export function storagePath(storageKey: string): string {
  return new LocalStore(uploadsDir()).pathOf(storageKey);
}

export interface StoredFile {
  readonly storageKey: string;
  /** true when this call put the object there (it was not stored before) */
  readonly placed: boolean;
}

/**
 * Streams a received temporary file into the store at its content address (or drops it when those bytes
 * are stored already). The temporary file is gone afterwards. A store that cannot be written is answered
 * as 503 naming the field the file came in; nothing is left in the store.
 */
export async function storeFile(tempPath: string, sha256: string, field?: string): Promise<StoredFile> {
  try {
    return await putContent(tempPath, sha256);
  } catch (e) {
    if (e instanceof StorageError) {
      console.error(`[uploads] storing ${field ?? 'a file'} failed: ${e.message}`);
      throw new ApiError(
        503,
        'storage_unavailable',
        `The file${field ? ` "${field}"` : ''} could not be stored (the file store did not accept it); nothing was registered. Try again shortly.`,
        field,
      );
    }
    throw e;
  }
}

/** Removes stored objects this request placed, when its registration did not go through. */
export async function releaseFiles(files: readonly StoredFile[], stillReferenced: (storageKey: string) => Promise<boolean>): Promise<void> {
  for (const f of files) {
    if (!f.placed || (await stillReferenced(f.storageKey))) continue;
    try {
      await objectStore().delete(f.storageKey);
    } catch (e) {
      // The refusal the caller is about to answer matters more; an orphan object is only wasted space.
      console.error(`[uploads] could not remove ${f.storageKey} after a failed registration: ${(e as Error).message}`);
    }
  }
}
