// Every data-changing route handler (tests/browser/route-guards.ts) refuses, over real HTTP against the
// built app, each role it does not admit (403) and a visitor without a session (401), in the API error
// shape, and changes nothing when it refuses.
import { randomUUID } from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { ROLES, type Role } from '@/lib/roles';
import { GUARDED_READS, GUARDED_ROUTES } from './route-guards';
import { call, signInOverHttp } from './http-session';

const cookies = {} as Record<Role, string>;
let viewerId = '';

beforeAll(async () => {
  for (const person of DEMO_PEOPLE) cookies[person.role] = await signInOverHttp(person.email, person.password);
  const people = await call('GET', '/api/admin/people', { cookie: cookies.admin });
  expect(people.status).toBe(200);
  viewerId = people.body.people.find((p: { role: Role; email: string }) => p.email === DEMO_PEOPLE[3].email).id;
});

// What a lower role would like to do with each route, if the guard let it.
function harmfulBody(path: string): unknown {
  if (path === '/api/admin/people') return { email: `intruder-${randomUUID().slice(0, 8)}@quillmere.example`, name: 'Intruder', role: 'admin' };
  if (path.endsWith('{person}')) return { role: 'admin' };
  return undefined;
}

const withPerson = (path: string) => path.replace('{person}', viewerId);
const refusedRoles = (allowed: readonly Role[]) => ROLES.filter((r) => !allowed.includes(r));

describe.each(GUARDED_ROUTES.map((r) => [`${r.method} ${r.path}`, r] as const))('%s', (_label, route) => {
  it('answers a visitor without a session with 401', async () => {
    const result = await call(route.method, withPerson(route.path), { body: harmfulBody(route.path) });
    expect(result.status).toBe(401);
    expect(result.body).toEqual({ error: { code: 'unauthenticated', message: 'Sign in to continue.' } });
  });

  it.each(refusedRoles(route.allowed))('refuses the %s role with 403 and changes nothing', async (role) => {
    const body = harmfulBody(route.path);
    const result = await call(route.method, withPerson(route.path), { cookie: cookies[role], body });
    expect(result.status).toBe(403);
    expect(result.body.error.code).toBe('forbidden');
    expect(result.body.error.message).toContain(`needs the ${route.allowed.join(' or ')} role`);

    const people = await call('GET', '/api/admin/people', { cookie: cookies.admin });
    const viewer = people.body.people.find((p: { id: string }) => p.id === viewerId);
    expect(viewer.role).toBe('viewer');
    if (body && typeof body === 'object' && 'email' in body) {
      expect(people.body.people.some((p: { email: string }) => p.email === (body as { email: string }).email)).toBe(false);
    }
  });

  it.each(route.allowed)('lets the %s role past the guard', async (role) => {
    const result = await call(route.method, withPerson(route.path), { cookie: cookies[role], body: route.invalidBody });
    expect([401, 403]).not.toContain(result.status);
    if (route.invalidBody !== undefined) {
      expect(result.status).toBe(400);
      expect(result.body.error.code).toBe('invalid_request');
    }
  });
});

describe.each(GUARDED_READS.map((r) => [`${r.method} ${r.path}`, r] as const))('%s', (_label, route) => {
  it.each(refusedRoles(route.allowed))('refuses the %s role with 403', async (role) => {
    const result = await call(route.method, route.path, { cookie: cookies[role] });
    expect(result.status).toBe(403);
    expect(result.body.error.code).toBe('forbidden');
  });

  it('answers an admin', async () => {
    expect((await call(route.method, route.path, { cookie: cookies.admin })).status).toBe(200);
  });
});

describe('validation on public routes', () => {
  it('names the field at fault', async () => {
    const result = await call('POST', '/api/links/redeem', { body: { token: 'short', password: 'long enough password' } });
    expect(result.status).toBe(400);
    expect(result.body.error.field).toBe('token');
  });
});

describe('guards read the account on every request', () => {
  it('apply a role change and a deactivation to a session that already exists', async () => {
    const email = `promoted-${randomUUID().slice(0, 8)}@quillmere.example`;
    const invited = await call('POST', '/api/admin/people', { cookie: cookies.admin, body: { email, name: 'Ilse Promoted', role: 'viewer' } });
    expect(invited.status).toBe(201);
    const mail = await call('GET', '/api/admin/mail?limit=20', { cookie: cookies.admin });
    const message = mail.body.messages.find((m: { envelopeTo: string[] }) => m.envelopeTo.includes(email));
    const token = /\/invite\/([A-Za-z0-9_-]{43})/.exec(message.textBody)![1];
    expect((await call('POST', '/api/links/redeem', { body: { token, password: 'promoted password 1' } })).status).toBe(200);

    const session = await signInOverHttp(email, 'promoted password 1');
    expect((await call('GET', '/api/admin/people', { cookie: session })).status).toBe(403);

    const id = invited.body.person.id;
    expect((await call('PATCH', `/api/admin/people/${id}`, { cookie: cookies.admin, body: { role: 'admin' } })).status).toBe(200);
    expect((await call('GET', '/api/admin/people', { cookie: session })).status).toBe(200);

    expect((await call('PATCH', `/api/admin/people/${id}`, { cookie: cookies.admin, body: { active: false } })).status).toBe(200);
    const afterDeactivation = await call('GET', '/api/admin/people', { cookie: session });
    expect(afterDeactivation.status).toBe(401);
    expect(afterDeactivation.body.error.code).toBe('unauthenticated');
  });
});
