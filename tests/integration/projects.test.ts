// Controller projects on the real PostgreSQL: creating them, who may change them, members, and how pins
// resolve (exact, newest approved within limits, retired skipped, upstream changed flagged). The expected
// versions follow from the rules of issue 7 applied to the versions each test registers.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { addMember, createProject, listMembers, listProjects, removeMember, updateProject } from '@/lib/projects';
import { createPin, deletePin, listProjectPins, pinCandidates, pinInputSchema, pinsForReducedModel, pinsNeedingAttention, updatePin, type PinInput } from '@/lib/pins';
import { makeUser, migrateTestDatabase } from './helpers';
import { addUpstreamVersion, addVersion, makeProjectShelf, retireVersion, stiffTestModel, uniqueSlug, type ProjectShelf } from './fixtures/projects';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

beforeAll(async () => {
  await migrateTestDatabase();
});

afterAll(async () => {
  await closeDb();
});

async function projectWithEngineer(label = 'ctl') {
  const engineer = asSession(await makeUser({ role: 'engineer', label: `${label}-eng` }));
  const project = await createProject({ name: `Zone controller ${label}`, slug: uniqueSlug(label) }, engineer);
  return { engineer, project };
}

describe('controller projects', () => {
  it('make their creator the first member and record the creation', async () => {
    const { engineer, project } = await projectWithEngineer('first');
    expect((await listMembers(project.id)).map((m) => m.userId)).toEqual([engineer.id]);
    const audit = await db()('audit_events').where({ subject_type: 'controller_project', subject_id: project.id }).first();
    expect(audit.action).toBe('project.created');
    const listed = (await listProjects(engineer)).find((p) => p.id === project.id)!;
    expect(listed).toMatchObject({ memberCount: 1, pinCount: 0, isMember: true });
  });

  it('derive the slug from the name and refuse a slug that is taken', async () => {
    const engineer = asSession(await makeUser({ role: 'engineer', label: 'slugger' }));
    const name = `Kiln 3 — Zone Süd ${uniqueSlug('x')}`;
    const project = await createProject({ name }, engineer);
    expect(project.slug).toMatch(/^kiln-3-zone-sud-x-[0-9a-f]{8}$/);
    await expect(createProject({ name: 'Another', slug: project.slug }, engineer)).rejects.toMatchObject({ status: 409, code: 'slug_taken', field: 'slug' });
  });

  it('are changed only by engineer members', async () => {
    const { engineer, project } = await projectWithEngineer('perm');
    const outsider = asSession(await makeUser({ role: 'engineer', label: 'outsider' }));
    const viewer = asSession(await makeUser({ role: 'viewer', label: 'member-viewer' }));
    await addMember(project.slug, viewer.email, engineer);

    await expect(updateProject(project.slug, { sampleTime: 0.01 }, outsider)).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    await expect(updateProject(project.slug, { sampleTime: 0.01 }, viewer)).rejects.toMatchObject({ status: 403 });
    await expect(addMember(project.slug, outsider.email, viewer)).rejects.toMatchObject({ status: 403 });
    expect((await updateProject(project.slug, { sampleTime: 0.01 }, engineer)).sampleTime).toBe(0.01);
  });

  it('keep at least one engineer member', async () => {
    const { engineer, project } = await projectWithEngineer('last');
    const viewer = asSession(await makeUser({ role: 'viewer', label: 'v' }));
    await addMember(project.slug, viewer.email, engineer);
    await expect(removeMember(project.slug, engineer.id, engineer)).rejects.toMatchObject({ status: 409, code: 'last_engineer' });
    const second = asSession(await makeUser({ role: 'engineer', label: 'second' }));
    await addMember(project.slug, second.email, engineer);
    const left = await removeMember(project.slug, engineer.id, second);
    expect(left.map((m) => m.userId).sort()).toEqual([viewer.id, second.id].sort());
  });

  it('refuse adding an unknown address or a member twice, naming the field', async () => {
    const { engineer, project } = await projectWithEngineer('twice');
    await expect(addMember(project.slug, 'nobody@test.quillmere.example', engineer)).rejects.toMatchObject({ status: 404, field: 'email' });
    const viewer = await makeUser({ role: 'viewer' });
    await addMember(project.slug, viewer.email, engineer);
    await expect(addMember(project.slug, viewer.email, engineer)).rejects.toMatchObject({ status: 409, code: 'already_member', field: 'email' });
  });
});

describe('pin resolution', () => {
  let shelf: ProjectShelf;
  beforeAll(async () => {
    shelf = await makeProjectShelf('resolve');
  });

  async function pinOf(spec: Omit<PinInput, 'reducedModel'>, s: ProjectShelf = shelf) {
    const { engineer, project } = await projectWithEngineer('res');
    const pin = await createPin(project.slug, { reducedModel: s.reducedModel.slug, ...spec }, engineer);
    return { engineer, project, pin };
  }

  it('exact: always the named version, and flags it once retired (reproducible download)', async () => {
    const s = await makeProjectShelf('exact');
    const v1 = await addVersion(s);
    await addVersion(s);
    const { project } = await pinOf({ mode: 'exact', version: 1 }, s);
    let [pin] = await listProjectPins(project.id);
    expect(pin.resolution.version?.number).toBe(1);
    expect(pin.resolution.retired).toBe(false);
    expect(pin.resolution.newerSatisfying.map((v) => v.number)).toEqual([2]);

    await retireVersion(v1.id, s.reviewer.id);
    [pin] = await listProjectPins(project.id);
    expect(pin.resolution.version?.number).toBe(1);
    expect(pin.resolution.version?.status).toBe('retired');
    expect(pin.resolution.retired).toBe(true);
    expect(pin.resolution.explanation).toMatch(/retired/);
  });

  it('exact: refuses a version that is not approved, naming the field', async () => {
    const s = await makeProjectShelf('draft');
    await addVersion(s, { status: 'draft' });
    await expect(pinOf({ mode: 'exact', version: 1 }, s)).rejects.toMatchObject({ status: 409, code: 'not_approved', field: 'version' });
    await expect(pinOf({ mode: 'exact', version: 9 }, s)).rejects.toMatchObject({ status: 404, field: 'version' });
  });

  it('newest approved: the highest-numbered approved version, skipping drafts and retired ones', async () => {
    const s = await makeProjectShelf('newest');
    await addVersion(s); // v1 approved
    const v2 = await addVersion(s); // v2 approved, retired below
    await addVersion(s, { status: 'draft' }); // v3 draft
    await retireVersion(v2.id, s.reviewer.id);
    const { project } = await pinOf({ mode: 'newest_approved' }, s);
    const [pin] = await listProjectPins(project.id);
    expect(pin.resolution.version?.number).toBe(1);
    expect(pin.resolution.retired).toBe(false);
  });

  it('newest approved within limits: order, relative H-infinity error and acceptance band', async () => {
    const s = await makeProjectShelf('limits');
    await addVersion(s, { matrices: stiffTestModel(3), hInfinityErrorRelative: 4e-3, acceptancePassed: true }); // v1 meets all
    await addVersion(s, { matrices: stiffTestModel(6), hInfinityErrorRelative: 1e-4, acceptancePassed: true }); // v2 order 6
    await addVersion(s, { matrices: stiffTestModel(4), hInfinityErrorRelative: 2e-2, acceptancePassed: true }); // v3 error 2 %
    await addVersion(s, { matrices: stiffTestModel(4), hInfinityErrorRelative: 1e-3, acceptancePassed: false }); // v4 band failed
    await addVersion(s, { matrices: stiffTestModel(4), hInfinityErrorRelative: null, acceptancePassed: true }); // v5 no figure

    const limits = { maxOrder: 4, maxRelativeHInfinityError: 0.01, requireAcceptancePassed: true };
    const { project } = await pinOf({ mode: 'newest_approved', ...limits }, s);
    const [pin] = await listProjectPins(project.id);
    expect(pin.resolution.version?.number).toBe(1);
    expect(pin.resolution.newestApproved?.number).toBe(5);
    expect(pin.resolution.explanation).toMatch(/v5 is not \(no relative H-infinity error in its accuracy report\)/);

    // Each limit alone admits a different newest version.
    const byOrder = await pinOf({ mode: 'newest_approved', maxOrder: 4 }, s);
    expect((await listProjectPins(byOrder.project.id))[0].resolution.version?.number).toBe(5);
    const byError = await pinOf({ mode: 'newest_approved', maxRelativeHInfinityError: 0.01 }, s);
    expect((await listProjectPins(byError.project.id))[0].resolution.version?.number).toBe(4);
    const byBand = await pinOf({ mode: 'newest_approved', requireAcceptancePassed: true, maxOrder: 5 }, s);
    expect((await listProjectPins(byBand.project.id))[0].resolution.version?.number).toBe(5);
  });

  it('newest approved: unresolved, with the reason, when no approved version meets the limits', async () => {
    const s = await makeProjectShelf('none');
    await addVersion(s, { matrices: stiffTestModel(6) });
    const { project } = await pinOf({ mode: 'newest_approved', maxOrder: 2 }, s);
    const [pin] = await listProjectPins(project.id);
    expect(pin.resolution.version).toBeNull();
    expect(pin.resolution.explanation).toBe('No approved version meets the limits (newest approved v1: order 6 > 2).');
    expect((await pinsNeedingAttention()).get(project.id)).toBe(1);
  });

  it('flags upstream changed when the source model has a newer version than the one reduced from', async () => {
    const s = await makeProjectShelf('upstream');
    await addVersion(s);
    const { project } = await pinOf({ mode: 'newest_approved' }, s);
    expect((await listProjectPins(project.id))[0].resolution.upstreamChanged).toBe(false);
    await addUpstreamVersion(s);
    const [flagged] = await listProjectPins(project.id);
    expect(flagged.resolution.version?.number).toBe(1);
    expect(flagged.resolution.upstreamChanged).toBe(true);
    // A version reduced from the new source version clears the flag once it is approved.
    await addVersion(s);
    const [fresh] = await listProjectPins(project.id);
    expect(fresh.resolution.version?.number).toBe(2);
    expect(fresh.resolution.upstreamChanged).toBe(false);
  });

  it('refuses limits on an exact pin and a version on a newest-approved pin (zod, by field)', async () => {
    await addVersion(shelf);
    const exactWithLimit = pinInputSchema.safeParse({ reducedModel: shelf.reducedModel.slug, mode: 'exact', version: 1, maxOrder: 3 });
    expect(exactWithLimit.success).toBe(false);
    expect(exactWithLimit.error?.issues[0].path).toEqual(['maxOrder']);
    const newestWithVersion = pinInputSchema.safeParse({ reducedModel: shelf.reducedModel.slug, mode: 'newest_approved', version: 1 });
    expect(newestWithVersion.error?.issues[0].path).toEqual(['version']);
    const badError = pinInputSchema.safeParse({ reducedModel: shelf.reducedModel.slug, mode: 'newest_approved', maxRelativeHInfinityError: -1 });
    expect(badError.error?.issues[0].path).toEqual(['maxRelativeHInfinityError']);
  });

  it('one pin per model and project; changed and removed by engineer members only', async () => {
    const s = await makeProjectShelf('edit');
    await addVersion(s);
    await addVersion(s);
    const { engineer, project, pin } = await pinOf({ mode: 'exact', version: 1 }, s);
    await expect(createPin(project.slug, { reducedModel: s.reducedModel.slug, mode: 'newest_approved' }, engineer)).rejects.toMatchObject({
      status: 409,
      code: 'already_pinned',
    });
    const viewer = asSession(await makeUser({ role: 'viewer' }));
    await addMember(project.slug, viewer.email, engineer);
    await expect(updatePin(project.slug, pin.id, { mode: 'newest_approved' }, viewer)).rejects.toMatchObject({ status: 403 });
    const changed = await updatePin(project.slug, pin.id, { mode: 'newest_approved' }, engineer);
    expect(changed.resolution.version?.number).toBe(2);
    await expect(deletePin(project.slug, pin.id, viewer)).rejects.toMatchObject({ status: 403 });
    await deletePin(project.slug, pin.id, engineer);
    expect(await listProjectPins(project.id)).toEqual([]);
  });

  it('reach the lineage: pinsForReducedModel lists each project and what its pin resolves to', async () => {
    const s = await makeProjectShelf('lineage');
    await addVersion(s);
    await addVersion(s);
    const a = await pinOf({ mode: 'exact', version: 1 }, s);
    const b = await pinOf({ mode: 'newest_approved' }, s);
    const listed = await pinsForReducedModel(s.reducedModel.id);
    const bySlug = new Map(listed.map((p) => [p.project.slug, p]));
    expect(bySlug.get(a.project.slug)).toMatchObject({ mode: 'exact', exactVersionNumber: 1, resolvedVersionNumber: 1 });
    expect(bySlug.get(b.project.slug)).toMatchObject({ mode: 'newest_approved', exactVersionNumber: null, resolvedVersionNumber: 2 });
  });

  it('offer only reduced models with an approved version as pin candidates', async () => {
    const drafts = await makeProjectShelf('cand-draft');
    await addVersion(drafts, { status: 'draft' });
    const approved = await makeProjectShelf('cand-ok');
    await addVersion(approved, { hInfinityErrorRelative: 3e-3 });
    const candidates = await pinCandidates();
    expect(candidates.some((c) => c.slug === drafts.reducedModel.slug)).toBe(false);
    const ok = candidates.find((c) => c.slug === approved.reducedModel.slug);
    expect(ok?.approvedVersions).toEqual([{ number: 1, order: 3, hInfinityErrorRelative: 3e-3, acceptancePassed: true }]);
  });
});
