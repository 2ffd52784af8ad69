// modeshelf.lock.json: the file a controller project keeps beside its code (README.md, "Pull API"). It records, for
// each pin, the exact version it resolved to and the SHA-256 of that version's registered matrices
// (lib/checksums.ts), so a build can check that what it compiled in is what was reviewed, and a CI job can
// ask whether the lock is still current.
//
// Format (ours; version 1), named the way the JSON export names its own (lib/exports/document.ts):
//   {
//     "format": "modeshelf-lock",
//     "formatVersion": 1,
//     "project": "<project slug>",
//     "generatedAt": "<ISO time>",
//     "entries": [
//       { "reducedModel": "<slug>", "pin": { "mode": "exact" | "newest_approved", ...limits },
//         "version": <number>, "matricesSha256": "<hex>", "status": "approved" | "retired",
//         "sourceModel": "<slug>", "sourceVersion": <number> }
//     ],
//     "unresolved": [ { "reducedModel": "<slug>", "reason": "<sentence>" } ]
//   }
//
// Verification compares a lock with the project's pins now and reports, per entry: newer approved versions
// that satisfy the pin, a pin that now resolves to another version, a retired version, a source model that
// changed upstream, a checksum that is not the registered one, or a model the project does not pin.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { ApiError } from '@/lib/http';
import { limitFailures, listProjectPins, loadVersionFacts, type PinLimits, type PinMode, type ResolvedPin } from '@/lib/pins';
import type { ProjectRow } from '@/lib/projects';

export const LOCKFILE_NAME = 'modeshelf.lock.json';
export const LOCKFILE_FORMAT = 'modeshelf-lock';
export const LOCKFILE_FORMAT_VERSION = 1;

export interface LockEntry {
  reducedModel: string;
  pin: { mode: PinMode; version?: number } & Partial<PinLimits>;
  version: number;
  matricesSha256: string;
  status: 'approved' | 'retired';
  sourceModel: string;
  sourceVersion: number;
}

export interface LockFile {
  format: typeof LOCKFILE_FORMAT;
  formatVersion: typeof LOCKFILE_FORMAT_VERSION;
  project: string;
  generatedAt: string;
  entries: LockEntry[];
  unresolved: { reducedModel: string; reason: string }[];
}

const slug = z.string({ error: 'must be a slug' }).min(1, 'must not be empty').max(200, 'is too long');

/** What verify accepts: the fields it compares; anything else in an entry is kept by the client, ignored here. */
export const lockFileSchema = z.object({
  format: z.literal(LOCKFILE_FORMAT, { error: `format must be "${LOCKFILE_FORMAT}" (download the lock file again if it was written before this field).` }),
  formatVersion: z.literal(LOCKFILE_FORMAT_VERSION, { error: `formatVersion must be ${LOCKFILE_FORMAT_VERSION}.` }),
  project: slug,
  entries: z
    .array(
      z.object({
        reducedModel: slug,
        version: z.number({ error: 'version must be a number' }).int('version must be a whole number').min(1, 'version must be at least 1'),
        matricesSha256: z.string({ error: 'matricesSha256 must be text' }).regex(/^[0-9a-f]{64}$/, 'matricesSha256 must be 64 lower-case hex digits'),
      }),
      { error: 'entries must be a list' },
    )
    .max(1000, 'a lock file holds at most 1000 entries'),
});

export type LockFileInput = z.infer<typeof lockFileSchema>;

function pinSpecForLock(pin: ResolvedPin): LockEntry['pin'] {
  if (pin.mode === 'exact') return { mode: 'exact', version: pin.exactVersionNumber ?? undefined };
  return { mode: 'newest_approved', ...pin.limits };
}

export async function buildLockFile(project: ProjectRow, now = new Date(), trx: Knex | Knex.Transaction = db()): Promise<LockFile> {
  const pins = await listProjectPins(project.id, trx);
  const entries: LockEntry[] = [];
  const unresolved: LockFile['unresolved'] = [];
  for (const pin of pins) {
    const v = pin.resolution.version;
    if (!v) {
      unresolved.push({ reducedModel: pin.reducedModel.slug, reason: pin.resolution.explanation });
      continue;
    }
    entries.push({
      reducedModel: pin.reducedModel.slug,
      pin: pinSpecForLock(pin),
      version: v.number,
      matricesSha256: v.matricesSha256,
      status: v.status,
      sourceModel: v.sourceModelSlug,
      sourceVersion: v.sourceVersionNumber,
    });
  }
  return { format: LOCKFILE_FORMAT, formatVersion: LOCKFILE_FORMAT_VERSION, project: project.slug, generatedAt: now.toISOString(), entries, unresolved };
}

export type FindingCode =
  | 'not_pinned'
  | 'unknown_version'
  | 'checksum_mismatch'
  | 'retired'
  | 'upstream_changed'
  | 'newer_approved'
  | 'resolves_elsewhere';

export interface EntryCheck {
  reducedModel: string;
  lockedVersion: number;
  current: boolean;
  findings: { code: FindingCode; message: string }[];
  /** What the pin resolves to now (null when the model is not pinned or nothing satisfies the pin). */
  resolvesTo: number | null;
  /** Approved versions newer than the locked one that satisfy the pin. */
  newerApprovedVersions: number[];
}

export interface LockCheck {
  project: string;
  current: boolean;
  checkedAt: string;
  entries: EntryCheck[];
  /** Pins of the project that the lock file does not list. */
  missing: string[];
}

export async function verifyLockFile(project: ProjectRow, lock: LockFileInput, now = new Date(), trx: Knex | Knex.Transaction = db()): Promise<LockCheck> {
  if (lock.project !== project.slug) {
    throw new ApiError(400, 'invalid_request', `project: this lock file is for "${lock.project}", not "${project.slug}".`, 'project');
  }
  const pins = await listProjectPins(project.id, trx);
  const bySlug = new Map(pins.map((p) => [p.reducedModel.slug, p]));
  const facts = await loadVersionFacts(pins.map((p) => p.reducedModel.id), trx);

  const entries: EntryCheck[] = lock.entries.map((entry) => {
    const findings: EntryCheck['findings'] = [];
    const pin = bySlug.get(entry.reducedModel);
    if (!pin) {
      // The same answer whether the model exists elsewhere or not at all.
      findings.push({ code: 'not_pinned', message: `This project does not pin a reduced model "${entry.reducedModel}".` });
      return { reducedModel: entry.reducedModel, lockedVersion: entry.version, current: false, findings, resolvesTo: null, newerApprovedVersions: [] };
    }
    const versions = facts.get(pin.reducedModel.id) ?? [];
    const locked = versions.find((v) => v.number === entry.version);
    const resolvesTo = pin.resolution.version?.number ?? null;
    if (!locked) {
      findings.push({ code: 'unknown_version', message: `v${entry.version} of "${entry.reducedModel}" is not an approved or retired version.` });
    } else {
      if (locked.matricesSha256 !== entry.matricesSha256) {
        findings.push({ code: 'checksum_mismatch', message: `The lock's checksum for v${entry.version} is not the registered one (${locked.matricesSha256}).` });
      }
      if (locked.status === 'retired') findings.push({ code: 'retired', message: `v${entry.version} has been retired.` });
      if (locked.newestSourceVersionNumber > locked.sourceVersionNumber) {
        findings.push({
          code: 'upstream_changed',
          message: `Its source model now has v${locked.newestSourceVersionNumber}; v${entry.version} was reduced from v${locked.sourceVersionNumber}.`,
        });
      }
    }
    const newer = versions
      .filter((v) => v.status === 'approved' && v.number > entry.version && (pin.mode === 'exact' || limitFailures(pin.limits, v).length === 0))
      .map((v) => v.number)
      .sort((a, b) => a - b);
    if (newer.length > 0) {
      findings.push({
        code: 'newer_approved',
        message: `Newer approved version${newer.length > 1 ? 's' : ''} satisfying the pin: ${newer.map((n) => `v${n}`).join(', ')}.`,
      });
    }
    if (resolvesTo !== entry.version && !(resolvesTo !== null && newer.includes(resolvesTo))) {
      findings.push({
        code: 'resolves_elsewhere',
        message: resolvesTo === null ? `The pin resolves to no version now: ${pin.resolution.explanation}` : `The pin now resolves to v${resolvesTo}.`,
      });
    }
    return { reducedModel: entry.reducedModel, lockedVersion: entry.version, current: findings.length === 0, findings, resolvesTo, newerApprovedVersions: newer };
  });
  const listed = new Set(lock.entries.map((e) => e.reducedModel));
  const missing = pins.filter((p) => !listed.has(p.reducedModel.slug)).map((p) => p.reducedModel.slug);
  return {
    project: project.slug,
    current: missing.length === 0 && entries.every((e) => e.current),
    checkedAt: now.toISOString(),
    entries,
    missing,
  };
}
