// The one way route handlers answer: JSON bodies, and errors as { error: { code, message, field? } } with a
// 4xx status. A stack trace never reaches the client; unexpected failures are logged here and answered as a
// plain 500.
import { NextResponse } from 'next/server';
import { z, ZodError } from 'zod';

export interface ApiErrorBody {
  error: { code: string; message: string; field?: string; link?: string };
}

/** A refusal the client can act on: the status, a stable machine code, a sentence, and the field at fault. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly field?: string,
    /** a page the client should offer, e.g. the existing version a duplicate upload matches */
    readonly link?: string,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

export const unauthenticated = () => new ApiError(401, 'unauthenticated', 'Sign in to continue.');
export const forbidden = (what = 'this action') =>
  new ApiError(403, 'forbidden', `Your role does not allow ${what}.`);
export const notFound = (what: string) => new ApiError(404, 'not_found', `${what} was not found.`);

export function errorResponse(error: ApiError): NextResponse<ApiErrorBody> {
  const body: ApiErrorBody = { error: { code: error.code, message: error.message } };
  if (error.field) body.error.field = error.field;
  if (error.link) body.error.link = error.link;
  return NextResponse.json(body, { status: error.status });
}

/** The first zod issue as an ApiError naming the field by its dotted path (e.g. "members.2.email"). */
export function validationError(err: ZodError): ApiError {
  const issue = err.issues[0];
  const field = issue && issue.path.length > 0 ? issue.path.map(String).join('.') : undefined;
  const message = issue ? (field ? `${field}: ${issue.message}` : issue.message) : 'The request is not valid.';
  return new ApiError(400, 'invalid_request', message, field);
}

/** Converts anything thrown by a handler into the error shape. */
export function toErrorResponse(err: unknown): NextResponse<ApiErrorBody> {
  if (err instanceof ApiError) return errorResponse(err);
  if (err instanceof ZodError) return errorResponse(validationError(err));
  console.error('[modeshelf] unhandled error in route handler', err);
  return errorResponse(new ApiError(500, 'internal', 'Something went wrong on the server; the error was logged.'));
}

type RouteContext<P> = { params: Promise<P> };

/**
 * Wraps a route handler so that thrown ApiErrors and ZodErrors become the error shape, and any value it
 * returns that is not already a Response is sent as JSON with status 200.
 */
export function route<P = Record<string, string>>(
  fn: (request: Request, context: RouteContext<P>) => Promise<unknown>,
): (request: Request, context: RouteContext<P>) => Promise<Response> {
  return async (request, context) => {
    try {
      const result = await fn(request, context);
      return result instanceof Response ? result : NextResponse.json(result);
    } catch (err) {
      return toErrorResponse(err);
    }
  };
}

/** Reads and validates a JSON body. A body that is not JSON is a 400, not a 500. */
export async function parseJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
  let raw: unknown;
  try {
    raw = await request.json();
  } catch {
    throw new ApiError(400, 'invalid_json', 'The request body must be JSON.');
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) throw validationError(parsed.error);
  return parsed.data;
}

/** Validates the query string against a schema of string fields. */
export function parseQuery<S extends z.ZodType>(request: Request, schema: S): z.infer<S> {
  const params = Object.fromEntries(new URL(request.url).searchParams.entries());
  const parsed = schema.safeParse(params);
  if (!parsed.success) throw validationError(parsed.error);
  return parsed.data;
}

/** Validates dynamic route segments (e.g. an id in the path). */
export async function parseParams<S extends z.ZodType>(params: Promise<unknown>, schema: S): Promise<z.infer<S>> {
  const parsed = schema.safeParse(await params);
  if (!parsed.success) throw validationError(parsed.error);
  return parsed.data;
}

export function created(body: unknown): NextResponse {
  return NextResponse.json(body, { status: 201 });
}
