// The API error shape (DEVELOPERS.md, Conventions, "Route handlers"): { error: { code, message, field? } }, a 4xx status, never a stack.
import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { ApiError, parseJson, parseQuery, route } from '@/lib/http';

const context = { params: Promise.resolve({}) };

async function answer(fn: (request: Request) => Promise<unknown>, request = new Request('http://x.test/api')) {
  const response = await route(fn)(request, context);
  return { status: response.status, body: await response.json() };
}

describe('route()', () => {
  it('sends a returned value as JSON with status 200', async () => {
    expect(await answer(async () => ({ ok: 1 }))).toEqual({ status: 200, body: { ok: 1 } });
  });

  it('turns an ApiError into its status, code, message and field', async () => {
    const result = await answer(async () => {
      throw new ApiError(409, 'last_admin', 'This is the only active admin.', 'role');
    });
    expect(result).toEqual({
      status: 409,
      body: { error: { code: 'last_admin', message: 'This is the only active admin.', field: 'role' } },
    });
  });

  it('names the field of the first validation problem by its path', async () => {
    const schema = z.object({ members: z.array(z.object({ email: z.email({ error: 'not an address' }) })) });
    const request = new Request('http://x.test/api', {
      method: 'POST',
      body: JSON.stringify({ members: [{ email: 'a@b.example' }, { email: 'nope' }] }),
    });
    const result = await answer((r) => parseJson(r, schema), request);
    expect(result).toEqual({
      status: 400,
      body: { error: { code: 'invalid_request', message: 'members.1.email: not an address', field: 'members.1.email' } },
    });
  });

  it('answers a body that is not JSON with 400, not 500', async () => {
    const request = new Request('http://x.test/api', { method: 'POST', body: '{"unterminated' });
    const result = await answer((r) => parseJson(r, z.object({})), request);
    expect(result).toEqual({ status: 400, body: { error: { code: 'invalid_json', message: 'The request body must be JSON.' } } });
  });

  it('validates the query string', async () => {
    const schema = z.object({ limit: z.coerce.number().int().max(500) });
    const result = await answer(async (r) => parseQuery(r, schema), new Request('http://x.test/api?limit=9000'));
    expect(result.status).toBe(400);
    expect(result.body.error.field).toBe('limit');
  });

  it('hides unexpected errors behind a plain 500 without a stack trace', async () => {
    const log = vi.spyOn(console, 'error').mockImplementation(() => {});
    const result = await answer(async () => {
      throw new Error('relation "secret_table" does not exist');
    });
    expect(result.status).toBe(500);
    expect(result.body.error.code).toBe('internal');
    expect(JSON.stringify(result.body)).not.toMatch(/secret_table|at .*\.ts/);
    expect(log).toHaveBeenCalled();
    log.mockRestore();
  });
});
