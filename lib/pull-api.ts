// The pull API's request plumbing (app/api/v1/): the bearer token taken from the request and checked
// against the project in the path (lib/project-tokens.ts), RFC 6750's WWW-Authenticate on a 401, and the
// project's pins in the shape the API answers with. Handlers stay a few lines: pullRoute(), authorise,
// call lib/, answer.
//
// Exports (pullExport) are kept once made: an approved or retired version's matrices and report are frozen
// (migration 20261202000200_reviews.ts), so the document for one version, format, sample time and pin
// context is the same bytes every time (with the time it was first generated). It is served from memory
// with a strong ETag (SHA-256 of the bytes) and `Cache-Control: private, no-cache`: a client may keep it and
// revalidate with If-None-Match (304, no body), since the pin may resolve to another version tomorrow. The
// key holds everything that can change the document (the version's status and its source model's newest
// version number, from the same query that resolves the pin), and an entry lives at most EXPORT_CACHE_MS.
import { createHash } from 'node:crypto';
import { z } from 'zod';
import { ApiError, route } from '@/lib/http';
import { authenticatePull, type PullCaller, type TokenScope } from '@/lib/project-tokens';
import { findPinByModelSlug, pinnedModelVersion, type ResolvedPin, type VersionFacts } from '@/lib/pins';
import { SLUG_PATTERN } from '@/lib/slug';
import { exportResponse, exportVersion, type ExportFormat, type PinContext } from '@/lib/exports';
import { CAUTION_TEXT } from '@/lib/caution';

type Context<P> = { params: Promise<P> };

/** route() plus the WWW-Authenticate challenge on 401s, so HTTP clients know a bearer token is expected. */
export function pullRoute<P>(fn: (request: Request, context: Context<P>) => Promise<unknown>) {
  const inner = route<P>(fn);
  return async (request: Request, context: Context<P>): Promise<Response> => {
    const response = await inner(request, context);
    if (response.status === 401) {
      const body = (await response.clone().json().catch(() => null)) as { error?: { code?: string } } | null;
      const challenge = body?.error?.code === 'token_missing' ? 'Bearer realm="modeshelf"' : 'Bearer realm="modeshelf", error="invalid_token"';
      response.headers.set('www-authenticate', challenge);
    }
    return response;
  };
}

export function clientAddress(request: Request): string {
  const forwarded = request.headers.get('x-forwarded-for');
  const first = forwarded ? forwarded.split(',')[0].trim() : '';
  return first || 'unknown';
}

/** The token's project, after checking it may make this request. */
export async function authenticatePullRequest(request: Request, projectSlug: string, scope: TokenScope | 'any'): Promise<PullCaller> {
  const url = new URL(request.url);
  return authenticatePull(
    {
      authorization: request.headers.get('authorization'),
      projectSlug,
      address: clientAddress(request),
      method: request.method,
      path: url.pathname + url.search,
    },
    scope,
  );
}

/** Project ids by slug, learnt from authorised requests (a slug may be renamed; an id never changes). */
const projectIds = new Map<string, string>();
const PROJECT_IDS_MAX = 10_000;

/**
 * Authorises the request and loads what it asks for in one round trip where it can: when this process has
 * seen the project before, `load` runs on its id beside the token check instead of after it. Its result is
 * used only once the token is found valid for that project and the id is confirmed (a renamed or re-made
 * project gets `load` again with the right id); a refused token discards it.
 */
export async function authorisedLoad<T>(
  request: Request,
  projectSlug: string,
  scope: TokenScope | 'any',
  load: (projectId: string) => Promise<T>,
): Promise<{ caller: PullCaller; value: T }> {
  const guess = projectIds.get(projectSlug);
  const authorising = authenticatePullRequest(request, projectSlug, scope);
  const early = guess === undefined ? null : load(guess);
  early?.catch(() => undefined); // a refused token leaves it unread
  const caller = await authorising;
  if (caller.project.id === guess && early) return { caller, value: await early };
  if (projectIds.size >= PROJECT_IDS_MAX) projectIds.clear();
  projectIds.set(projectSlug, caller.project.id);
  return { caller, value: await load(caller.project.id) };
}

export const projectParamsSchema = z.object({ project: z.string() });
export const modelParamsSchema = z.object({ project: z.string(), model: z.string() });
export const versionParamsSchema = z.object({ project: z.string(), model: z.string(), number: z.string() });

/** The {number} path segment as a version number, or a 400 naming it. */
export function versionNumber(raw: string): number {
  if (!/^[1-9]\d{0,8}$/.test(raw)) {
    throw new ApiError(400, 'invalid_request', `number: "${raw.slice(0, 20)}" is not a version number; give a whole number such as 3.`, 'number');
  }
  return Number(raw);
}

/** The project's pin of that model (undefined for none, or for a slug that cannot be one). */
export function findPinnedModel(projectId: string, modelSlug: string): Promise<ResolvedPin | undefined> {
  return SLUG_PATTERN.test(modelSlug) ? findPinByModelSlug(projectId, modelSlug) : Promise.resolve(undefined);
}

/** The pin found, or a 404 that reads the same whether the model exists elsewhere or not. */
export function pinnedOr404(pin: ResolvedPin | undefined, modelSlug: string): ResolvedPin {
  if (!pin) throw new ApiError(404, 'not_found', `This project pins no reduced model "${modelSlug.slice(0, 100)}".`);
  return pin;
}


export function pinContext(caller: PullCaller, pin: ResolvedPin): PinContext {
  return {
    project: { slug: caller.project.slug, name: caller.project.name },
    mode: pin.mode,
    exactVersionNumber: pin.exactVersionNumber,
    limits: pin.limits,
    explanation: pin.resolution.explanation,
  };
}

/** A numbered approved or retired version of the pinned model, or 404 (drafts are never served). */
export async function pinnedVersion(pin: ResolvedPin, number: number): Promise<VersionFacts> {
  const v = await pinnedModelVersion(pin, number);
  if (!v) throw new ApiError(404, 'not_found', `"${pin.reducedModel.slug}" has no approved or retired version v${number}.`);
  return v;
}

/** The version a pin resolves to now, or 409 when none does. */
export function resolvedVersion(pin: ResolvedPin): VersionFacts {
  const v = pin.resolution.version;
  if (!v) throw new ApiError(409, 'unresolved_pin', `The pin of "${pin.reducedModel.slug}" resolves to no version: ${pin.resolution.explanation}`);
  return v;
}

/** How long a made export is kept (MODESHELF_EXPORT_CACHE_MS; 0 turns the cache off). */
export function exportCacheMs(): number {
  const raw = process.env.MODESHELF_EXPORT_CACHE_MS;
  const value = raw === undefined || raw === '' ? NaN : Number(raw);
  return Number.isFinite(value) && value >= 0 ? value : 10 * 60_000;
}
const EXPORT_CACHE_MAX_ENTRIES = 256;
const EXPORT_CACHE_MAX_BYTES = 64 * 1024 * 1024;

interface MadeExport {
  body: Uint8Array<ArrayBuffer>;
  headers: [string, string][];
  etag: string;
  at: number;
}
const made = new Map<string, MadeExport>();
let madeBytes = 0;

function keep(key: string, entry: MadeExport): void {
  const old = made.get(key);
  if (old) madeBytes -= old.body.byteLength;
  made.delete(key);
  made.set(key, entry);
  madeBytes += entry.body.byteLength;
  // Oldest first out (a Map iterates in insertion order; a hit re-inserts its entry).
  while (made.size > EXPORT_CACHE_MAX_ENTRIES || madeBytes > EXPORT_CACHE_MAX_BYTES) {
    const [k, v] = made.entries().next().value!;
    made.delete(k);
    madeBytes -= v.body.byteLength;
  }
}

/** Does an If-None-Match header name this ETag (RFC 9110 §13.1.2: weak comparison; "*" matches any)? */
function matches(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  if (ifNoneMatch.trim() === '*') return true;
  return ifNoneMatch.split(',').some((t) => t.trim().replace(/^W\//, '') === etag);
}

export interface PullExportRequest {
  version: VersionFacts;
  format: ExportFormat;
  ts?: string;
  projectSampleTime: number | null;
  pin: PinContext;
}

/** An export of an approved or retired version as the pull API answers it (see the header comment). */
export async function pullExport(request: Request, input: PullExportRequest): Promise<Response> {
  const { version } = input;
  const key = JSON.stringify([version.id, version.status, version.newestSourceVersionNumber, input.format, input.ts ?? null, input.projectSampleTime, input.pin]);
  const ttl = exportCacheMs();
  let entry = ttl > 0 ? made.get(key) : undefined;
  if (entry && Date.now() - entry.at >= ttl) entry = undefined;
  if (entry) keep(key, entry);
  else {
    const response = exportResponse(
      await exportVersion({ versionId: version.id, format: input.format, ts: input.ts, projectSampleTime: input.projectSampleTime, pin: input.pin }),
    );
    const body = new Uint8Array(await response.arrayBuffer());
    const etag = `"${createHash('sha256').update(body).digest('base64url')}"`;
    entry = { body, headers: [...response.headers.entries()], etag, at: Date.now() };
    if (ttl > 0) keep(key, entry);
  }
  const headers = new Headers(entry.headers);
  headers.set('etag', entry.etag);
  headers.set('cache-control', 'private, no-cache');
  if (matches(request.headers.get('if-none-match'), entry.etag)) {
    headers.delete('content-type');
    headers.delete('content-disposition');
    return new Response(null, { status: 304, headers });
  }
  return new Response(entry.body, { status: 200, headers });
}

export function pinsBody(caller: PullCaller, pins: ResolvedPin[]) {
  const base = `/api/v1/projects/${caller.project.slug}`;
  return {
    project: { slug: caller.project.slug, name: caller.project.name, sampleTime: caller.project.sample_time },
    tokenScope: caller.scope,
    pins: pins.map((pin) => {
      const v = pin.resolution.version;
      return {
        reducedModel: { slug: pin.reducedModel.slug, name: pin.reducedModel.name },
        mode: pin.mode,
        exactVersion: pin.exactVersionNumber,
        limits: pin.mode === 'newest_approved' ? pin.limits : null,
        resolved: v
          ? {
              version: v.number,
              status: v.status,
              order: v.order,
              matricesSha256: v.matricesSha256,
              sourceModel: v.sourceModelSlug,
              sourceVersion: v.sourceVersionNumber,
              hInfinityErrorRelative: v.hInfinityErrorRelative,
              acceptancePassed: v.acceptancePassed,
              // The worker's stored verdict (lib/acceptance.ts): pass, fail or not-checked; null without a band.
              acceptance: v.acceptance ? v.acceptance.status : null,
            }
          : null,
        flags: { retired: pin.resolution.retired, upstreamChanged: pin.resolution.upstreamChanged, unresolved: v === null },
        newestApprovedVersion: pin.resolution.newestApproved?.number ?? null,
        explanation: pin.resolution.explanation,
        links: {
          json: `${base}/models/${pin.reducedModel.slug}`,
          csv: `${base}/models/${pin.reducedModel.slug}?format=csv`,
          cHeader: `${base}/models/${pin.reducedModel.slug}?format=c`,
          ...(caller.project.sample_time !== null ? { discretised: `${base}/models/${pin.reducedModel.slug}?ts=project` } : {}),
        },
      };
    }),
    caution: CAUTION_TEXT,
  };
}
