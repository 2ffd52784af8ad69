// Where uploads live and how large one may be. Read from the environment on every call, so a test can
// point a process at a temporary folder before its first upload.
//
//   MODESHELF_UPLOADS_DIR       the local store's folder (default <repo>/uploads, git-ignored) and, with any
//                               store, the folder of uploads being received (<uploads>/tmp); lib/storage
//   MODESHELF_MAX_UPLOAD_BYTES  largest upload, all its files together (default 512 MiB)
import path from 'node:path';

export const DEFAULT_MAX_UPLOAD_BYTES = 512 * 1024 * 1024;

/** The checkout the app runs from: `npm start`, the worker and the tests all start in it. */
export function repoRoot(): string {
  return process.env.MODESHELF_ROOT || process.cwd();
}

export function uploadsDir(): string {
  // Uploads are data, not code: the build must not trace the folder into the server output.
  return path.resolve(/*turbopackIgnore: true*/ process.env.MODESHELF_UPLOADS_DIR || path.join(repoRoot(), 'uploads'));
}

export function maxUploadBytes(): number {
  const raw = process.env.MODESHELF_MAX_UPLOAD_BYTES;
  if (raw === undefined || raw.trim() === '') return DEFAULT_MAX_UPLOAD_BYTES;
  const value = Number(raw);
  if (!Number.isInteger(value) || value <= 0) {
    throw new Error(`MODESHELF_MAX_UPLOAD_BYTES must be a positive whole number of bytes, got "${raw}"`);
  }
  return value;
}

/** "512 MiB", "1.5 KiB": binary units (IEC 80000-13), so the default limit reads as the round number it is. */
export function formatBytes(bytes: number): string {
  const units = ['bytes', 'KiB', 'MiB', 'GiB'];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  const text = unit === 0 ? String(value) : value >= 100 ? value.toFixed(0) : value.toPrecision(3).replace(/\.?0+$/, '');
  return `${text} ${units[unit]}`;
}
