// The pull API's request plumbing (app/api/v1/): the bearer token taken from the request and checked
// against the project in the path (lib/project-tokens.ts), RFC 6750's WWW-Authenticate on a 401, and the
// project's pins in the shape the API answers with. Handlers stay a few lines: pullRoute(), authorise,
// call lib/, answer.
import { z } from 'zod';
import { ApiError, route } from '@/lib/http';
import { authenticatePull, type PullCaller, type TokenScope } from '@/lib/project-tokens';
import { findPinByModelSlug, pinnedModelVersion, type ResolvedPin } from '@/lib/pins';
import { SLUG_PATTERN } from '@/lib/projects';
import type { PinContext } from '@/lib/exports';
import { CAUTION_TEXT } from '@/components/workspace/caution-text';

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

/** The project's pin of that model, or a 404 that reads the same whether the model exists elsewhere or not. */
export async function requirePinnedModel(caller: PullCaller, modelSlug: string): Promise<ResolvedPin> {
  const pin = SLUG_PATTERN.test(modelSlug) ? await findPinByModelSlug(caller.project.id, modelSlug) : undefined;
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

/** The version a pin resolves to now, or 409 when none does. */
export function resolvedVersionId(pin: ResolvedPin): string {
  const v = pin.resolution.version;
  if (!v) throw new ApiError(409, 'unresolved_pin', `The pin of "${pin.reducedModel.slug}" resolves to no version: ${pin.resolution.explanation}`);
  return v.id;
}

/** A numbered approved or retired version of the pinned model, or 404 (drafts are never served). */
export async function pinnedVersionId(pin: ResolvedPin, number: number): Promise<string> {
  const v = await pinnedModelVersion(pin, number);
  if (!v) throw new ApiError(404, 'not_found', `"${pin.reducedModel.slug}" has no approved or retired version v${number}.`);
  return v.id;
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
              hinfErrorRelative: v.hinfErrorRelative,
              acceptancePassed: v.acceptancePassed,
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
