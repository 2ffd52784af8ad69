// A model uploaded as one zip archive: its members are unpacked (jszip) into a folder of their own under the
// uploads' temporary folder, each streamed to disk while its SHA-256 is computed, and then stored and
// registered exactly like the same files uploaded one by one (same roles, same version checksum, so the
// same model sent either way is recognised as the same version). Runs in the upload check's child process
// (lib/engine-tasks/validate-cli.ts), so unpacking never grows the web server's memory.
//
// Members are named by their role: A, B, C, D, E (first order, D and E optional), or M, K with B and C and
// optionally D (second order: M, D, K are mass, damping and stiffness, as written M q̈ + D q̇ + K q = F u;
// the feedthrough, if any, is a member named "feedthrough"); the words mass, damping, stiffness are taken
// too; or a single JSON model. Extensions .mtx, .mm, .csv (.json for the JSON model); folders inside the
// archive, and the "__MACOSX" and hidden entries some archivers add, are passed over. Anything else is
// refused with the member named, as is an archive that unpacks past the upload limit.
import { createHash, randomBytes } from 'node:crypto';
import { once } from 'node:events';
import { createWriteStream, mkdirSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import JSZip from 'jszip';
import type { FileRole } from '../engine-tasks/model-files';
import { formatBytes } from './settings';

export interface ExtractedMember {
  readonly role: FileRole;
  /** the member's file name (without its folder inside the archive) */
  readonly name: string;
  readonly path: string;
  readonly size: number;
  readonly sha256: string;
}

export type ArchiveOutcome =
  | { ok: true; members: ExtractedMember[] }
  | { ok: false; error: { code: string; field: 'archive'; message: string } };

const MATRIX_EXTENSIONS = new Set(['.mtx', '.mm', '.csv']);
const FIRST_ORDER: Record<string, FileRole> = { a: 'A', b: 'B', c: 'C', d: 'D', e: 'E' };
const SECOND_ORDER: Record<string, FileRole> = {
  m: 'mass',
  mass: 'mass',
  d: 'damping',
  damping: 'damping',
  k: 'stiffness',
  stiffness: 'stiffness',
  b: 'B',
  c: 'C',
  feedthrough: 'D',
};

const refuse = (code: string, message: string): ArchiveOutcome => ({ ok: false, error: { code, field: 'archive', message } });

/** Unpacks `archivePath` into a new folder under `outDir`; at most `maxBytes` unpacked in all. */
export async function extractArchive(archivePath: string, archiveName: string, outDir: string, maxBytes: number): Promise<ArchiveOutcome> {
  let zip: JSZip;
  try {
    zip = await JSZip.loadAsync(readFileSync(archivePath));
  } catch (e) {
    return refuse('unreadable_archive', `${archiveName} cannot be read as a zip archive (${(e as Error).message})`);
  }
  const entries = Object.values(zip.files).filter((f) => {
    if (f.dir) return false;
    const parts = f.name.split('/');
    return !parts.some((p) => p === '__MACOSX' || p.startsWith('.'));
  });
  if (entries.length === 0) return refuse('empty_archive', `${archiveName} holds no files`);
  const bases = entries.map((f) => {
    const name = path.posix.basename(f.name);
    const ext = path.extname(name).toLowerCase();
    return { entry: f, name, ext, stem: name.slice(0, name.length - ext.length).toLowerCase() };
  });
  let roles: FileRole[];
  if (bases.length === 1 && bases[0].ext === '.json') roles = ['model'];
  else {
    const secondOrder = bases.some((b) => ['m', 'k', 'mass', 'stiffness'].includes(b.stem));
    const table = secondOrder ? SECOND_ORDER : FIRST_ORDER;
    roles = [];
    for (const b of bases) {
      const role = table[b.stem];
      if (!role || !MATRIX_EXTENSIONS.has(b.ext)) {
        return refuse(
          'unknown_member',
          `${archiveName}: “${b.entry.name}” is not a model file: name the members ${secondOrder ? 'M, D, K, B, C (and feedthrough)' : 'A, B, C, D, E (or M, D, K, B, C for a second-order model)'} with the extension .mtx or .csv, or put one .json model in the archive`,
        );
      }
      if (roles.includes(role)) return refuse('duplicate_member', `${archiveName}: two members give ${role} (“${b.entry.name}” and another)`);
      roles.push(role);
    }
  }
  const folder = path.join(outDir, `archive-${Date.now()}-${randomBytes(6).toString('hex')}`);
  mkdirSync(folder, { recursive: true });
  const members: ExtractedMember[] = [];
  let total = 0;
  try {
    for (let k = 0; k < bases.length; k++) {
      const b = bases[k];
      const target = path.join(folder, `${k}-${roles[k]}${b.ext}`);
      const hash = createHash('sha256');
      let size = 0;
      let tooLarge = false;
      const out = createWriteStream(target, { flags: 'wx' });
      const closed = once(out, 'close');
      try {
        await new Promise<void>((resolve, reject) => {
          // jszip's member stream (a Node stream of its own): paused while the file catches up.
          const source = b.entry.nodeStream('nodebuffer');
          source.on('data', (chunk: Buffer) => {
            if (tooLarge) return;
            size += chunk.length;
            total += chunk.length;
            if (total > maxBytes) {
              tooLarge = true;
              source.pause();
              resolve();
              return;
            }
            hash.update(chunk);
            if (!out.write(chunk)) {
              source.pause();
              out.once('drain', () => source.resume());
            }
          });
          source.on('end', () => resolve());
          source.on('error', reject);
          out.on('error', reject);
        });
      } finally {
        out.end();
        await closed;
      }
      if (tooLarge) {
        rmSync(folder, { recursive: true, force: true });
        return {
          ok: false,
          error: { code: 'archive_too_large', field: 'archive', message: `${archiveName} unpacks to more than the upload limit of ${formatBytes(maxBytes)}` },
        };
      }
      members.push({ role: roles[k], name: b.name, path: target, size, sha256: hash.digest('hex') });
    }
  } catch (e) {
    rmSync(folder, { recursive: true, force: true });
    return refuse('unreadable_archive', `${archiveName}: a member could not be unpacked (${(e as Error).message})`);
  }
  return { ok: true, members };
}
