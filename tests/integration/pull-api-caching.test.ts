// The pull API's exports are made once per version and pin context and served with a strong ETag
// (issue 17): the ETag is the SHA-256 of the exact bytes (recomputed here with node:crypto), If-None-Match
// with it gets 304 and no body (RFC 9110 §13.1.2, §15.4.5), and anything that changes the document —
// a newer approved version, the version retired, a newer source version, the project's sample time —
// gives new bytes and a new ETag at once. Every request, 304s included, is still recorded as a token use.
// The token check and the pins' query run side by side (lib/pull-api.ts, authorisedLoad): a project renamed
// and another made under its old slug must each still get only their own pins.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/lib/db';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { createProject, updateProject } from '@/lib/projects';
import { createPin } from '@/lib/pins';
import { createProjectToken, listTokenUses } from '@/lib/project-tokens';
import { GET as modelGet } from '@/app/api/v1/projects/[project]/models/[model]/route';
import { GET as pinsGet } from '@/app/api/v1/projects/[project]/pins/route';
import { GET as versionGet } from '@/app/api/v1/projects/[project]/models/[model]/versions/[number]/route';
import { makeUser, migrateTestDatabase } from './helpers';
import { addUpstreamVersion, addVersion, makeProjectShelf, retireVersion, stiffTestModel, uniqueSlug, type ProjectShelf } from './fixtures/projects';
import { db } from '@/lib/db';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

let shelf: ProjectShelf;
let engineer: SessionUser;
let project: { id: string; slug: string };
let token: string;
let tokenId: string;

beforeAll(async () => {
  await migrateTestDatabase();
  shelf = await makeProjectShelf('etag');
  await addVersion(shelf, { matrices: stiffTestModel(4, 1, 1, 7) });
  engineer = asSession(await makeUser({ role: 'engineer', label: 'etag' }));
  project = await createProject({ name: 'ETag controller', slug: uniqueSlug('etag') }, engineer);
  await createPin(project.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved' }, engineer);
  const made = await createProjectToken(project.slug, { name: 'etag' }, engineer);
  token = made.token;
  tokenId = made.record.id;
});

afterAll(async () => {
  await closeDb();
});

function get(path: string, headers: Record<string, string> = {}): Request {
  return new Request(new URL(path, 'http://modeshelf.test'), {
    headers: { authorization: `Bearer ${token}`, 'x-forwarded-for': '198.51.100.9', ...headers },
  });
}

async function model(query = '', headers: Record<string, string> = {}) {
  const res = await modelGet(get(`/api/v1/projects/${project.slug}/models/${shelf.reducedModel.slug}${query}`, headers), {
    params: Promise.resolve({ project: project.slug, model: shelf.reducedModel.slug }),
  });
  const body = Buffer.from(await res.arrayBuffer());
  return { res, body };
}

const strongTagOf = (body: Buffer) => `"${createHash('sha256').update(body).digest('base64url')}"`;

describe('pull API exports: strong ETag, 304, and new bytes when the document changes', () => {
  it('answers with the SHA-256 of its bytes as a strong ETag and a no-cache Cache-Control', async () => {
    const first = await model();
    expect(first.res.status).toBe(200);
    const etag = first.res.headers.get('etag')!;
    expect(etag).toBe(strongTagOf(first.body));
    expect(etag.startsWith('W/')).toBe(false);
    expect(first.res.headers.get('cache-control')).toBe('private, no-cache');
    expect(JSON.parse(first.body.toString()).version.number).toBe(1);
    // The same document again, byte for byte.
    const second = await model();
    expect(second.res.headers.get('etag')).toBe(etag);
    expect(second.body.equals(first.body)).toBe(true);
  });

  it('answers 304 with no body to If-None-Match naming its ETag (also in a list, or weak), 200 otherwise', async () => {
    const { res, body } = await model('?format=c');
    const etag = res.headers.get('etag')!;
    expect(etag).toBe(strongTagOf(body));
    for (const given of [etag, `"other", ${etag}`, `W/${etag}`, '*']) {
      const again = await model('?format=c', { 'if-none-match': given });
      expect(again.res.status).toBe(304);
      expect(again.body.length).toBe(0);
      expect(again.res.headers.get('etag')).toBe(etag);
    }
    const other = await model('?format=c', { 'if-none-match': '"not-this-one"' });
    expect(other.res.status).toBe(200);
    expect(other.body.equals(body)).toBe(true);
    // Every one of those requests is on the token's use record, 304s included.
    const row = (await db()('controller_projects').where({ id: project.id }).first())!;
    const uses = await listTokenUses(row, tokenId, engineer, 500);
    expect(uses.filter((u) => u.path.endsWith('?format=c'))).toHaveLength(6);
  });

  it('gives a new document and ETag when a newer version is approved, when it is retired, and when upstream changes', async () => {
    const before = await model();
    const v2 = await addVersion(shelf, { matrices: stiffTestModel(4, 1, 1, 8) });
    const newer = await model('', { 'if-none-match': before.res.headers.get('etag')! });
    expect(newer.res.status).toBe(200);
    expect(JSON.parse(newer.body.toString()).version.number).toBe(2);
    expect(newer.res.headers.get('etag')).toBe(strongTagOf(newer.body));

    // v2 by number, then retired: the numbered export now says so (body and warning header).
    const byNumber = async () => {
      const res = await versionGet(get(`/api/v1/projects/${project.slug}/models/${shelf.reducedModel.slug}/versions/2`), {
        params: Promise.resolve({ project: project.slug, model: shelf.reducedModel.slug, number: '2' }),
      });
      return { res, body: Buffer.from(await res.arrayBuffer()) };
    };
    const approved = await byNumber();
    expect(approved.res.headers.get('x-modeshelf-warnings')).toBeNull();
    await retireVersion(v2.id, shelf.reviewer.id);
    const retired = await byNumber();
    expect(retired.res.headers.get('etag')).not.toBe(approved.res.headers.get('etag'));
    expect(retired.res.headers.get('x-modeshelf-warnings')).toMatch(/retired/);

    // The pin (newest approved) falls back to v1; then a newer source version flags it upstream-changed.
    const back = await model();
    expect(JSON.parse(back.body.toString()).version.number).toBe(1);
    await addUpstreamVersion(shelf);
    const upstream = await model();
    expect(upstream.res.headers.get('etag')).not.toBe(back.res.headers.get('etag'));
    expect(upstream.res.headers.get('x-modeshelf-warnings')).toMatch(/upstream-changed/);
  });

  it("follows the project's sample time for ts=project at once", async () => {
    await updateProject(project.slug, { sampleTime: 0.01 }, engineer);
    const a = await model('?ts=project');
    expect(JSON.parse(a.body.toString()).discretisation.ts).toBe(0.01);
    await updateProject(project.slug, { sampleTime: 0.02 }, engineer);
    const b = await model('?ts=project', { 'if-none-match': a.res.headers.get('etag')! });
    expect(b.res.status).toBe(200);
    expect(JSON.parse(b.body.toString()).discretisation.ts).toBe(0.02);
  });
});

describe('the token check and the pins query in one round trip', () => {
  it("never serves one project's pins under another's slug: a renamed project, and a new one made with its old slug", async () => {
    const pins = async (slug: string, tok: string) => {
      const res = await pinsGet(new Request(new URL(`/api/v1/projects/${slug}/pins`, 'http://modeshelf.test'), { headers: { authorization: `Bearer ${tok}` } }), {
        params: Promise.resolve({ project: slug }),
      });
      return { status: res.status, body: await res.json() };
    };
    const oldSlug = uniqueSlug('renamed');
    const a = await createProject({ name: 'Renamed controller', slug: oldSlug }, engineer);
    await createPin(a.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved' }, engineer);
    const tokenA = (await createProjectToken(a.slug, { name: 'a' }, engineer)).token;
    expect((await pins(oldSlug, tokenA)).body.pins).toHaveLength(1); // this process now knows the slug's id

    const newSlug = uniqueSlug('renamed-to');
    // The app never renames a project; the guard must hold even if the database is changed under it.
    await db()('controller_projects').where({ id: a.id }).update({ slug: newSlug });
    const b = await createProject({ name: 'Newcomer controller', slug: oldSlug }, engineer);
    const tokenB = (await createProjectToken(b.slug, { name: 'b' }, engineer)).token;

    const asB = await pins(oldSlug, tokenB);
    expect(asB.status).toBe(200);
    expect(asB.body.project).toMatchObject({ slug: oldSlug, name: 'Newcomer controller' });
    expect(asB.body.pins).toEqual([]);
    expect((await pins(oldSlug, tokenA)).body.error.code).toBe('wrong_project');
    const asA = await pins(newSlug, tokenA);
    expect(asA.body.project.slug).toBe(newSlug);
    expect(asA.body.pins.map((p: { reducedModel: { slug: string } }) => p.reducedModel.slug)).toEqual([shelf.reducedModel.slug]);
  });
});
