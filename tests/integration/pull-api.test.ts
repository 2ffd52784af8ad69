// The pull API (app/api/v1/) on the real PostgreSQL, through its route handlers: project tokens (hashing,
// revocation, expiry, scope, another project's token), refusals in the standard error shape that never
// tell whether a model exists in another project, recorded uses, and the lock file with its verification.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { addMember, createProject, updateProject } from '@/lib/projects';
import { createPin } from '@/lib/pins';
import { authenticatePull, createProjectToken, listProjectTokens, listTokenUses, revokeProjectToken } from '@/lib/project-tokens';
import { makeUser, migrateTestDatabase, uniqueAddress } from './helpers';
import { addUpstreamVersion, addVersion, makeProjectShelf, retireVersion, stiffTestModel, uniqueSlug, type ProjectShelf } from './fixtures/projects';
import { pull } from './fixtures/pull';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

let engineer: SessionUser;
let shelf: ProjectShelf;
let project: { id: string; slug: string };
let token: string;

beforeAll(async () => {
  await migrateTestDatabase();
  engineer = asSession(await makeUser({ role: 'engineer', label: 'pull-eng' }));
  shelf = await makeProjectShelf('pull');
  await addVersion(shelf, { matrices: stiffTestModel(3) });
  project = await createProject({ name: 'Zone 2 controller', slug: uniqueSlug('zone2') }, engineer);
  await createPin(project.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved' }, engineer);
  token = (await createProjectToken(project.slug, { name: 'zone 2 CI' }, engineer)).token;
});

afterAll(async () => {
  await closeDb();
});

async function errorOf(response: Response) {
  return { status: response.status, body: await response.json(), challenge: response.headers.get('www-authenticate') };
}

describe('project tokens', () => {
  it('are 256-bit random, shown once, and stored only as their SHA-256', async () => {
    const made = await createProjectToken(project.slug, { name: 'hash check' }, engineer);
    expect(made.token).toMatch(/^msp_[A-Za-z0-9_-]{43}$/);
    const row = await db()('project_tokens').where({ id: made.record.id }).first();
    expect(row.token_hash).toBe(createHash('sha256').update(made.token).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(made.token.slice(4));
    expect(row.token_prefix).toBe(made.token.slice(0, 10));
    const listed = await listProjectTokens((await db()('controller_projects').where({ id: project.id }).first())!, engineer);
    expect(JSON.stringify(listed)).not.toContain(made.token.slice(10));
  });

  it('are made by engineer members only', async () => {
    const viewer = asSession(await makeUser({ role: 'viewer', label: 'tok-viewer' }));
    await addMember(project.slug, viewer.email, engineer);
    await expect(createProjectToken(project.slug, { name: 'viewer token' }, viewer)).rejects.toMatchObject({ status: 403 });
    const outsider = asSession(await makeUser({ role: 'engineer', label: 'tok-outsider' }));
    await expect(createProjectToken(project.slug, { name: 'outsider token' }, outsider)).rejects.toMatchObject({ status: 403 });
    const row = (await db()('controller_projects').where({ id: project.id }).first())!;
    await expect(listProjectTokens(row, outsider)).rejects.toMatchObject({ status: 403 });
  });

  it('work until revoked, then get 401 token_revoked', async () => {
    const made = await createProjectToken(project.slug, { name: 'to revoke' }, engineer);
    expect((await pull.pins(project.slug, { token: made.token })).status).toBe(200);
    const revoked = await revokeProjectToken(project.slug, made.record.id, engineer);
    expect(revoked.state).toBe('revoked');
    const refused = await errorOf(await pull.pins(project.slug, { token: made.token }));
    expect(refused.status).toBe(401);
    expect(refused.body.error.code).toBe('token_revoked');
    expect(refused.challenge).toBe('Bearer realm="modeshelf", error="invalid_token"');
    await expect(revokeProjectToken(project.slug, made.record.id, engineer)).rejects.toMatchObject({ status: 409 });
  });

  it('expire after their days', async () => {
    const made = await createProjectToken(project.slug, { name: 'short lived', expiresInDays: 1 }, engineer);
    const facts = { authorization: `Bearer ${made.token}`, projectSlug: project.slug, address: uniqueAddress(), method: 'GET', path: '/x' };
    const inAnHour = new Date(Date.now() + 3_600_000);
    await expect(authenticatePull(facts, 'pull', inAnHour)).resolves.toMatchObject({ scope: 'pull' });
    const inTwoDays = new Date(Date.now() + 2 * 86_400_000);
    await expect(authenticatePull(facts, 'pull', inTwoDays)).rejects.toMatchObject({ status: 401, code: 'token_expired' });
    // Through the handler, with a token whose expiry has already passed.
    await db()('project_tokens').where({ id: made.record.id }).update({ expires_at: new Date(Date.now() - 1000) });
    expect((await errorOf(await pull.pins(project.slug, { token: made.token }))).body.error.code).toBe('token_expired');
  });

  it('are scoped: lock-check reads pins and the lock file but never matrices', async () => {
    const made = await createProjectToken(project.slug, { name: 'lock check only', scope: 'lock-check' }, engineer);
    expect((await pull.pins(project.slug, { token: made.token })).status).toBe(200);
    expect((await pull.lock(project.slug, { token: made.token })).status).toBe(200);
    const refused = await errorOf(await pull.model(project.slug, shelf.reducedModel.slug, { token: made.token }));
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('insufficient_scope');
    expect((await errorOf(await pull.version(project.slug, shelf.reducedModel.slug, '1', { token: made.token }))).status).toBe(403);
  });

  it('record each use with time, client address, method and path', async () => {
    const made = await createProjectToken(project.slug, { name: 'use record' }, engineer);
    const address = uniqueAddress();
    await pull.pins(project.slug, { token: made.token, address });
    await pull.model(project.slug, shelf.reducedModel.slug, { token: made.token, address, query: { format: 'c' } });
    const row = (await db()('controller_projects').where({ id: project.id }).first())!;
    const uses = await listTokenUses(row, made.record.id, engineer);
    expect(uses.map((u) => [u.address, u.method, u.path])).toEqual([
      [address, 'GET', `/api/v1/projects/${project.slug}/models/${shelf.reducedModel.slug}?format=c`],
      [address, 'GET', `/api/v1/projects/${project.slug}/pins`],
    ]);
    const listed = (await listProjectTokens(row, engineer)).find((t) => t.id === made.record.id)!;
    expect(listed).toMatchObject({ useCount: 2, lastAddress: address, state: 'active' });
  });
});

describe('refusals', () => {
  it('401 without a token, with a bearer challenge, in the error shape', async () => {
    const refused = await errorOf(await pull.pins(project.slug));
    expect(refused).toEqual({
      status: 401,
      body: { error: { code: 'token_missing', message: 'Send the project token as "Authorization: Bearer msp_…".' } },
      challenge: 'Bearer realm="modeshelf"',
    });
    expect((await errorOf(await pull.pins(project.slug, { authorization: 'Basic dXNlcjpwYXNz' }))).body.error.code).toBe('token_missing');
  });

  it('401 for a token that is not ours or is malformed', async () => {
    const unknown = `msp_${'A'.repeat(43)}`;
    expect((await errorOf(await pull.pins(project.slug, { token: unknown }))).body.error).toEqual({ code: 'token_invalid', message: 'That project token is not known here.' });
    expect((await errorOf(await pull.pins(project.slug, { token: 'not-a-token' }))).body.error.code).toBe('token_invalid');
  });

  it("403 for another project's token, the same whether the named project exists or not", async () => {
    const other = await createProject({ name: 'Other controller', slug: uniqueSlug('other') }, engineer);
    const existing = await errorOf(await pull.pins(other.slug, { token }));
    const missing = await errorOf(await pull.pins(uniqueSlug('nowhere'), { token }));
    expect(existing.status).toBe(403);
    expect(existing.body).toEqual({ error: { code: 'wrong_project', message: 'This token belongs to another controller project.' } });
    expect(missing).toEqual(existing);
  });

  it('404 for a model the project does not pin, the same whether it exists elsewhere or not', async () => {
    const elsewhere = await makeProjectShelf('elsewhere');
    await addVersion(elsewhere);
    const other = await createProject({ name: 'Pins the other model', slug: uniqueSlug('elsewhere') }, engineer);
    await createPin(other.slug, { reducedModel: elsewhere.reducedModel.slug, mode: 'newest_approved' }, engineer);

    const realModel = await errorOf(await pull.model(project.slug, elsewhere.reducedModel.slug, { token }));
    const noModel = await errorOf(await pull.model(project.slug, 'zone-rom-nonexistent', { token }));
    expect(realModel.status).toBe(404);
    expect(noModel.status).toBe(404);
    expect(realModel.body.error.code).toBe('not_found');
    // The message repeats only the slug the caller sent; the rest is identical.
    expect(realModel.body.error.message.replace(elsewhere.reducedModel.slug, 'X')).toBe(noModel.body.error.message.replace('zone-rom-nonexistent', 'X'));
    expect((await errorOf(await pull.version(project.slug, elsewhere.reducedModel.slug, '1', { token }))).status).toBe(404);
  });

  it('404 for a version number that is a draft or does not exist; 400 for one that is not a number', async () => {
    const draftNumber = (await addVersion(shelf, { status: 'draft' })).number;
    expect((await pull.version(project.slug, shelf.reducedModel.slug, String(draftNumber), { token })).status).toBe(404);
    expect((await pull.version(project.slug, shelf.reducedModel.slug, '999', { token })).status).toBe(404);
    const bad = await errorOf(await pull.version(project.slug, shelf.reducedModel.slug, 'latest', { token }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('number');
  });

  it.each([['0'], ['-0.01'], ['abc'], ['1e400'], ['NaN'], ['0x10'], ['100000']])('400 naming ts for ts=%s', async (ts) => {
    const refused = await errorOf(await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts } }));
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('invalid_request');
    expect(refused.body.error.field).toBe('ts');
  });

  it('400 for ts=project when the project has no sample time, and for an unknown query field or format', async () => {
    expect((await errorOf(await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: 'project' } }))).body.error.field).toBe('ts');
    expect((await errorOf(await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { format: 'xlsx' } }))).body.error.field).toBe('format');
    expect((await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { version: '1' } })).status).toBe(400);
  });
});

describe('GET pins', () => {
  it('lists each pin with its resolved version, checksum and flags', async () => {
    const response = await pull.pins(project.slug, { token });
    expect(response.status).toBe(200);
    const body = await response.json();
    const stored = await db()('reduced_versions').where({ reduced_model_id: shelf.reducedModel.id, number: 1 }).first('matrices_sha256');
    expect(body.project.slug).toBe(project.slug);
    expect(body.pins).toHaveLength(1);
    expect(body.pins[0]).toMatchObject({
      reducedModel: { slug: shelf.reducedModel.slug },
      mode: 'newest_approved',
      resolved: { version: 1, status: 'approved', order: 3, matricesSha256: stored.matrices_sha256 },
      flags: { retired: false, upstreamChanged: false, unresolved: false },
    });
    expect(body.caution).toMatch(/not a certification/);
  });
});

describe('modeshelf.lock.json', () => {
  async function lockedProject(label: string) {
    const s = await makeProjectShelf(label);
    await addVersion(s, { matrices: stiffTestModel(3, 2, 2, 7) });
    const p = await createProject({ name: `Lock ${label}`, slug: uniqueSlug(label) }, engineer);
    await createPin(p.slug, { reducedModel: s.reducedModel.slug, mode: 'newest_approved', maxOrder: 4 }, engineer);
    const t = (await createProjectToken(p.slug, { name: 'lock' }, engineer)).token;
    const response = await pull.lock(p.slug, { token: t });
    expect(response.headers.get('content-disposition')).toBe('attachment; filename="modeshelf.lock.json"');
    return { s, p, t, lock: await response.json() };
  }

  it('lists each pin with its exact version and the registered checksum', async () => {
    const { s, p, lock } = await lockedProject('lockfile');
    const stored = await db()('reduced_versions').where({ reduced_model_id: s.reducedModel.id, number: 1 }).first('matrices_sha256');
    expect(lock).toMatchObject({
      format: 'modeshelf-lock',
      formatVersion: 1,
      project: p.slug,
      entries: [
        {
          reducedModel: s.reducedModel.slug,
          pin: { mode: 'newest_approved', maxOrder: 4, maxRelativeHInfinityError: null, requireAcceptancePassed: false },
          version: 1,
          matricesSha256: stored.matrices_sha256,
          status: 'approved',
          sourceModel: s.sourceModel.slug,
          sourceVersion: 1,
        },
      ],
      unresolved: [],
    });
  });

  it('verifies as current until something changes, then names newer approved, retired and upstream-changed entries', async () => {
    const { s, p, t, lock } = await lockedProject('verify');
    const verify = async (body: unknown) => (await pull.verify(p.slug, { token: t, body })).json();
    expect(await verify(lock)).toMatchObject({ current: true, missing: [], entries: [{ current: true, findings: [], resolvesTo: 1 }] });

    await addVersion(s, { matrices: stiffTestModel(8) }); // v2: order 8, outside maxOrder 4
    expect((await verify(lock)).current).toBe(true);
    await addVersion(s, { matrices: stiffTestModel(4) }); // v3: within the limits
    let check = await verify(lock);
    expect(check.current).toBe(false);
    expect(check.entries[0]).toMatchObject({ resolvesTo: 3, newerApprovedVersions: [3] });
    expect(check.entries[0].findings.map((f: { code: string }) => f.code)).toEqual(['newer_approved']);

    const v1 = await db()('reduced_versions').where({ reduced_model_id: s.reducedModel.id, number: 1 }).first('id');
    await retireVersion(v1.id, s.reviewer.id);
    await addUpstreamVersion(s);
    check = await verify(lock);
    expect(check.entries[0].findings.map((f: { code: string }) => f.code)).toEqual(['retired', 'upstream_changed', 'newer_approved']);
  });

  it('reports a wrong checksum, a model not pinned, a pin missing from the lock, and refuses another project’s lock', async () => {
    const { s, p, t, lock } = await lockedProject('tamper');
    const tampered = structuredClone(lock);
    tampered.entries[0].matricesSha256 = '0'.repeat(64);
    tampered.entries.push({ reducedModel: 'zone-rom-not-pinned', version: 1, matricesSha256: 'f'.repeat(64) });
    const check = await (await pull.verify(p.slug, { token: t, body: tampered })).json();
    expect(check.current).toBe(false);
    expect(check.entries[0].findings.map((f: { code: string }) => f.code)).toEqual(['checksum_mismatch']);
    expect(check.entries[1]).toMatchObject({ current: false, findings: [{ code: 'not_pinned' }] });

    const empty = await (await pull.verify(p.slug, { token: t, body: { ...lock, entries: [] } })).json();
    expect(empty).toMatchObject({ current: false, missing: [s.reducedModel.slug] });

    const foreign = await errorOf(await pull.verify(p.slug, { token: t, body: { ...lock, project: 'someone-else' } }));
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.field).toBe('project');
    const malformed = await errorOf(await pull.verify(p.slug, { token: t, body: { format: 'modeshelf-lock', formatVersion: 1, project: p.slug, entries: [{ reducedModel: 'x', version: 'one' }] } }));
    expect(malformed.status).toBe(400);
    expect(malformed.body.error.field).toBe('entries.0.version');
    // A lock without our format name (e.g. one kept from before the format was named) is refused, naming the field.
    const { format: _format, ...unnamed } = lock;
    const noFormat = await errorOf(await pull.verify(p.slug, { token: t, body: unnamed }));
    expect(noFormat.status).toBe(400);
    expect(noFormat.body.error.field).toBe('format');
    expect(noFormat.body.error.message).toContain('modeshelf-lock');
    const wrongVersion = await errorOf(await pull.verify(p.slug, { token: t, body: { ...lock, formatVersion: 2 } }));
    expect(wrongVersion.status).toBe(400);
    expect(wrongVersion.body.error.field).toBe('formatVersion');
  });

  it('lists an unresolved pin separately instead of locking a version', async () => {
    const s = await makeProjectShelf('unres');
    await addVersion(s, { matrices: stiffTestModel(6) });
    const p = await createProject({ name: 'Unresolved', slug: uniqueSlug('unres') }, engineer);
    await updateProject(p.slug, { sampleTime: 0.002 }, engineer);
    await createPin(p.slug, { reducedModel: s.reducedModel.slug, mode: 'newest_approved', maxOrder: 2 }, engineer);
    const t = (await createProjectToken(p.slug, { name: 'unres' }, engineer)).token;
    const lock = await (await pull.lock(p.slug, { token: t })).json();
    expect(lock.entries).toEqual([]);
    expect(lock.unresolved).toEqual([{ reducedModel: s.reducedModel.slug, reason: 'No approved version meets the limits (newest approved v1: order 6 > 2).' }]);
    const model = await errorOf(await pull.model(p.slug, s.reducedModel.slug, { token: t }));
    expect(model.status).toBe(409);
    expect(model.body.error.code).toBe('unresolved_pin');
  });
});
