// Project tokens: how a controller project's build or CI authenticates to the pull API (app/api/v1/).
//
// A token is "msp_" followed by 32 random bytes in base64url (256 bits). It is shown once, when it is made;
// the database keeps only its SHA-256 (a fast hash is enough for a secret of that entropy: there is nothing
// to guess) and its first characters, so people can tell their tokens apart. Each token belongs to one
// project and has a scope:
//   pull        read the project's pins, download pinned models, the lock file and its check (the default)
//   lock-check  the pins list, the lock file and its check only: for a CI job that checks that a lock is
//               current without ever receiving matrices
// A token may expire; it can be revoked at once. Every request that presents a valid token is recorded
// (time, client address, method, path).
//
// The pull API's hot path (issue 17): the token check is one read-only statement (token and project by
// the token's hash, a named prepared statement), and the uses are written in batches, one INSERT at most
// every USE_FLUSH_MS (100 ms) rather than one per request. Revocation, expiry and project settings still
// apply to the very next request. Readers of the use record in this process (listProjectTokens,
// listTokenUses) flush the batch first; a process that dies loses at most the last 100 ms of records.
import { hashSecretToken, newSecretToken } from '@/lib/auth/secret-token';
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { preparedRows } from '@/lib/prepared';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import { requireProject, requireProjectManager, requireProjectMember, type ProjectRow } from '@/lib/projects';
import type { SessionUser } from '@/lib/auth';

export const TOKEN_SCOPES = ['pull', 'lock-check'] as const;
export type TokenScope = (typeof TOKEN_SCOPES)[number];

export const SCOPE_DUTIES: Record<TokenScope, string> = {
  pull: "reads the project's pins and downloads the pinned reduced models (JSON, CSV bundle, C header, discretised), the lock file and its check",
  'lock-check': "reads the project's pins, the lock file and its check; never receives matrices",
};

const TOKEN_PREFIX = 'msp_';
const TOKEN_PATTERN = /^msp_[A-Za-z0-9_-]{43}$/;
/** Characters kept for display: the "msp_" marker and 6 of the random part (36 bits; not enough to guess with). */
const DISPLAY_PREFIX_LENGTH = TOKEN_PREFIX.length + 6;
export const MAX_TOKEN_LIFETIME_DAYS = 366;

export interface ProjectTokenRow {
  id: string;
  project_id: string;
  name: string;
  token_hash: string;
  token_prefix: string;
  scope: TokenScope;
  expires_at: Date | null;
  revoked_at: Date | null;
  revoked_by: string | null;
  created_by: string;
  created_at: Date;
}

export interface ProjectToken {
  id: string;
  name: string;
  prefix: string;
  scope: TokenScope;
  expiresAt: string | null;
  revokedAt: string | null;
  createdAt: string;
  createdBy: string;
  state: 'active' | 'expired' | 'revoked';
  useCount: number;
  lastUsedAt: string | null;
  lastAddress: string | null;
}

export interface TokenUse {
  at: string;
  address: string;
  method: string;
  path: string;
}

export const tokenCreateSchema = z.object({
  name: z
    .string({ error: 'Name the token after where it will be used, e.g. "zone controller CI".' })
    .trim()
    .min(1, 'Name the token after where it will be used, e.g. "zone controller CI".')
    .max(80, 'The token name must be at most 80 characters.'),
  scope: z.enum(TOKEN_SCOPES, { error: `Scope must be one of ${TOKEN_SCOPES.join(', ')}.` }).default('pull'),
  expiresInDays: z
    .number({ error: 'Expiry must be a number of days.' })
    .int('Expiry must be a whole number of days.')
    .min(1, 'Expiry must be at least 1 day.')
    .max(MAX_TOKEN_LIFETIME_DAYS, `Expiry must be at most ${MAX_TOKEN_LIFETIME_DAYS} days.`)
    .nullable()
    .default(null),
});

export type TokenCreateInput = z.input<typeof tokenCreateSchema>;

export function generateProjectToken(): string {
  return TOKEN_PREFIX + newSecretToken();
}

function tokenState(row: Pick<ProjectTokenRow, 'expires_at' | 'revoked_at'>, now: Date): ProjectToken['state'] {
  if (row.revoked_at) return 'revoked';
  if (row.expires_at && row.expires_at.getTime() <= now.getTime()) return 'expired';
  return 'active';
}

export async function createProjectToken(
  projectSlug: string,
  input: TokenCreateInput,
  actor: SessionUser,
  now = new Date(),
  outer: Knex = db(),
): Promise<{ token: string; record: ProjectToken }> {
  const parsed = tokenCreateSchema.parse(input);
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const token = generateProjectToken();
    const [row] = await trx<ProjectTokenRow>('project_tokens')
      .insert({
        project_id: project.id,
        name: parsed.name,
        token_hash: hashSecretToken(token),
        token_prefix: token.slice(0, DISPLAY_PREFIX_LENGTH),
        scope: parsed.scope,
        expires_at: parsed.expiresInDays === null ? null : new Date(now.getTime() + parsed.expiresInDays * 86_400_000),
        created_by: actor.id,
        created_at: now,
      })
      .returning('*');
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project_token.created',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { tokenId: row.id, name: row.name, scope: row.scope, expiresAt: row.expires_at },
    });
    return { token, record: toProjectToken(row, actor.name, { count: 0, lastAt: null, lastAddress: null }, now) };
  });
}

function toProjectToken(
  row: ProjectTokenRow,
  createdByName: string,
  uses: { count: number; lastAt: Date | null; lastAddress: string | null },
  now: Date,
): ProjectToken {
  return {
    id: row.id,
    name: row.name,
    prefix: row.token_prefix,
    scope: row.scope,
    expiresAt: row.expires_at ? row.expires_at.toISOString() : null,
    revokedAt: row.revoked_at ? row.revoked_at.toISOString() : null,
    createdAt: row.created_at.toISOString(),
    createdBy: createdByName,
    state: tokenState(row, now),
    useCount: uses.count,
    lastUsedAt: uses.lastAt ? uses.lastAt.toISOString() : null,
    lastAddress: uses.lastAddress,
  };
}

/** The project's tokens, newest first, with their use counts; members only. */
export async function listProjectTokens(project: ProjectRow, viewer: SessionUser, now = new Date()): Promise<ProjectToken[]> {
  await requireProjectMember(project, viewer);
  await flushTokenUses();
  const rows = await db()('project_tokens as t')
    .join('users as u', 'u.id', 't.created_by')
    .where('t.project_id', project.id)
    .select(
      't.*',
      'u.name as created_by_name',
      db().raw('(SELECT count(*)::int FROM token_uses tu WHERE tu.token_id = t.id) AS use_count'),
      db().raw('(SELECT max(tu.at) FROM token_uses tu WHERE tu.token_id = t.id) AS last_used_at'),
      db().raw('(SELECT tu.address FROM token_uses tu WHERE tu.token_id = t.id ORDER BY tu.at DESC, tu.id DESC LIMIT 1) AS last_address'),
    )
    .orderBy('t.created_at', 'desc');
  return rows.map((r) => toProjectToken(r, r.created_by_name, { count: r.use_count, lastAt: r.last_used_at, lastAddress: r.last_address }, now));
}

export async function listTokenUses(project: ProjectRow, tokenId: string, viewer: SessionUser, limit = 50): Promise<TokenUse[]> {
  await requireProjectMember(project, viewer);
  await flushTokenUses();
  const token = await db()('project_tokens').where({ id: tokenId, project_id: project.id }).first('id');
  if (!token) throw notFound('That token');
  const rows = await db()('token_uses').where({ token_id: tokenId }).orderBy([{ column: 'at', order: 'desc' }, { column: 'id', order: 'desc' }]).limit(limit);
  return rows.map((r) => ({ at: (r.at as Date).toISOString(), address: r.address, method: r.method, path: r.path }));
}

export async function revokeProjectToken(
  projectSlug: string,
  tokenId: string,
  actor: SessionUser,
  now = new Date(),
  outer: Knex = db(),
): Promise<ProjectToken> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const before = await trx<ProjectTokenRow>('project_tokens').where({ id: tokenId, project_id: project.id }).forUpdate().first();
    if (!before) throw notFound('That token');
    if (before.revoked_at) throw new ApiError(409, 'already_revoked', `The token "${before.name}" was already revoked.`);
    const [row] = await trx<ProjectTokenRow>('project_tokens')
      .where({ id: tokenId })
      .update({ revoked_at: now, revoked_by: actor.id })
      .returning('*');
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project_token.revoked',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { tokenId, name: row.name },
    });
    const creator = await trx('users').where({ id: row.created_by }).first('name');
    return toProjectToken(row, creator?.name ?? '', { count: 0, lastAt: null, lastAddress: null }, now);
  });
}

const USE_FLUSH_MS = 100;
const USE_FLUSH_BATCH = 500;

interface PendingUse {
  token_id: string;
  at: Date;
  address: string;
  method: string;
  path: string;
}
let pendingUses: PendingUse[] = [];
let flushTimer: NodeJS.Timeout | null = null;
let flushing: Promise<void> = Promise.resolve();

/** Writes the uses recorded so far in this process (one INSERT). */
export function flushTokenUses(): Promise<void> {
  if (flushTimer) clearTimeout(flushTimer);
  flushTimer = null;
  const batch = pendingUses;
  pendingUses = [];
  flushing = flushing.then(async () => {
    if (batch.length === 0) return;
    try {
      await db()('token_uses').insert(batch);
    } catch (err) {
      console.error(`[modeshelf] ${batch.length} pull API token use(s) not recorded`, err);
    }
  });
  return flushing;
}

function recordUse(use: PendingUse): void {
  pendingUses.push(use);
  if (pendingUses.length >= USE_FLUSH_BATCH) void flushTokenUses();
  else if (!flushTimer) {
    flushTimer = setTimeout(() => void flushTokenUses(), USE_FLUSH_MS);
    flushTimer.unref?.();
  }
}

export interface PullCaller {
  tokenId: string;
  scope: TokenScope;
  project: ProjectRow;
}

export interface PullRequestFacts {
  authorization: string | null;
  projectSlug: string;
  address: string;
  method: string;
  path: string;
}

const unauthorised = (code: string, message: string) => new ApiError(401, code, message);

type TokenLookupRow = ProjectTokenRow & {
  p_name: string;
  p_slug: string;
  p_description: string;
  p_sample_time: number | null;
  p_created_by: string;
  p_created_at: Date;
  p_updated_at: Date;
};

/**
 * Checks the bearer token of a pull API request against the project named in its path, and records the use.
 *   401  no token, a token that is not ours, revoked, expired
 *   403  a valid token of another project (whether or not the named project exists), or a scope too narrow
 */
export async function authenticatePull(
  facts: PullRequestFacts,
  requiredScope: TokenScope | 'any',
  now = new Date(),
  trx: Knex | Knex.Transaction = db(),
): Promise<PullCaller> {
  if (!facts.authorization) {
    throw unauthorised('token_missing', 'Send the project token as "Authorization: Bearer msp_…".');
  }
  const match = /^Bearer\s+(\S+)\s*$/i.exec(facts.authorization);
  if (!match) throw unauthorised('token_missing', 'The Authorization header must read "Bearer msp_…".');
  const token = match[1];
  if (!TOKEN_PATTERN.test(token)) throw unauthorised('token_invalid', 'That is not a Modeshelf project token.');
  const [row] = await preparedRows<TokenLookupRow>(
    trx.raw(
      `SELECT t.*, p.name AS p_name, p.slug AS p_slug, p.description AS p_description,
              p.sample_time AS p_sample_time, p.created_by AS p_created_by,
              p.created_at AS p_created_at, p.updated_at AS p_updated_at
         FROM project_tokens t JOIN controller_projects p ON p.id = t.project_id
        WHERE t.token_hash = ?`,
      [hashSecretToken(token)],
    ),
    trx,
  );
  if (row && tokenState(row, now) === 'active') {
    const use = { token_id: row.id, at: now, address: facts.address, method: facts.method, path: facts.path.slice(0, 500) };
    // Inside a caller's transaction the use commits (or not) with it; otherwise it joins the next batch.
    if (trx === db()) recordUse(use);
    else await trx('token_uses').insert(use);
  }
  if (!row) throw unauthorised('token_invalid', 'That project token is not known here.');
  const state = tokenState(row, now);
  if (state === 'revoked') throw unauthorised('token_revoked', `The project token "${row.name}" was revoked; ask a project engineer for a new one.`);
  if (state === 'expired') throw unauthorised('token_expired', `The project token "${row.name}" expired; ask a project engineer for a new one.`);

  if (row.p_slug !== facts.projectSlug) {
    throw new ApiError(403, 'wrong_project', 'This token belongs to another controller project.');
  }
  if (requiredScope !== 'any' && row.scope !== requiredScope) {
    throw new ApiError(403, 'insufficient_scope', `This token's scope is "${row.scope}" (${SCOPE_DUTIES[row.scope]}); this request needs "${requiredScope}".`);
  }
  return {
    tokenId: row.id,
    scope: row.scope,
    project: {
      id: row.project_id,
      name: row.p_name,
      slug: row.p_slug,
      description: row.p_description,
      sample_time: row.p_sample_time,
      created_by: row.p_created_by,
      created_at: row.p_created_at,
      updated_at: row.p_updated_at,
    },
  };
}
