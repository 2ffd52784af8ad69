// Controller projects: their records, members, schemas and permission rules. Pins live in lib/pins/,
// project tokens in lib/project-tokens.ts.
//
// Who may do what (checked here, beside the writes; route handlers first check the shelf role):
//   - any signed-in person reads the project list and a project's pins, members and downloads;
//   - members (any role) also see the project's tokens and their uses;
//   - engineer members change the project: settings, members, pins, tokens. An engineer creates a project
//     and becomes its first member. A project always keeps at least one engineer member.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import { emailSchema, findUserByEmail } from '@/lib/people';
import type { SessionUser } from '@/lib/auth';
import type { Role } from '@/lib/roles';
import { SLUG_PATTERN, slugFromName } from '@/lib/slug';

export interface ProjectRow {
  id: string;
  name: string;
  slug: string;
  description: string;
  sample_time: number | null;
  /** the acceptance band, rad/s (all three null when the project has none; absent where a query did not select them) */
  acceptance_min_frequency?: number | null;
  acceptance_max_frequency?: number | null;
  acceptance_max_error?: number | null;
  created_by: string;
  created_at: Date;
  updated_at: Date;
}

export interface Project {
  id: string;
  name: string;
  slug: string;
  description: string;
  /** Seconds; the default sample time of discretised exports. */
  sampleTime: number | null;
  /** The frequencies the controller needs the reduced model accurate over (rad/s), and the largest error it accepts there. */
  acceptanceBand: AcceptanceBand | null;
  createdAt: string;
}

export interface AcceptanceBand {
  minFrequency: number;
  maxFrequency: number;
  maxError: number | null;
}

export interface ProjectMember {
  userId: string;
  name: string;
  email: string;
  role: Role;
  active: boolean;
  addedAt: string;
}

/** The people a project's pages and routes need to tell apart. */
export interface ProjectAccess {
  isMember: boolean;
  /** An engineer member: may change settings, members, pins and tokens. */
  canManage: boolean;
}

export const projectSlugSchema = z
  .string({ error: 'The project slug is required.' })
  .min(1, 'The project slug is required.')
  .max(60, 'The project slug must be at most 60 characters.')
  .regex(SLUG_PATTERN, 'The project slug may hold lower-case letters, digits and single hyphens, e.g. "kiln-3-zone-controller".');

/** Seconds, as a number; the form sends it as typed. */
export const sampleTimeSchema = z
  .number({ error: 'Sample time must be a number of seconds, e.g. 0.001.' })
  .refine((v) => Number.isFinite(v) && v > 0, 'Sample time must be a positive number of seconds.')
  .refine((v) => v <= 86_400, 'Sample time must be at most 86400 s (a day).');

/** rad/s: 0 ≤ min < max, finite; the largest error, when given, positive and finite. */
export const acceptanceBandSchema = z
  .object({
    minFrequency: z
      .number({ error: 'The acceptance band’s lower edge must be a finite number of rad/s.' })
      .min(0, 'The acceptance band’s lower edge must be 0 or above.'),
    maxFrequency: z
      .number({ error: 'The acceptance band’s upper edge must be a finite number of rad/s.' })
      .positive('The acceptance band’s upper edge must be above 0.'),
    maxError: z
      .number({ error: 'The largest error must be a finite number.' })
      .positive('The largest error must be above 0.')
      .nullable()
      .default(null),
  })
  .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The acceptance band’s upper edge must be above its lower edge.', path: ['maxFrequency'] });

const projectBase = z.object({
  name: z
    .string({ error: 'Name is required.' })
    .trim()
    .min(1, 'Name is required.')
    .max(120, 'Name must be at most 120 characters.'),
  slug: projectSlugSchema,
  description: z.string({ error: 'Description must be text.' }).trim().max(2000, 'Description must be at most 2000 characters.'),
  sampleTime: sampleTimeSchema.nullable(),
  acceptanceBand: acceptanceBandSchema.nullable(),
});

export const projectCreateSchema = projectBase
  .pick({ name: true })
  .extend({
    slug: projectSlugSchema.optional(),
    description: projectBase.shape.description.optional(),
    sampleTime: projectBase.shape.sampleTime.optional(),
  });

export const projectUpdateSchema = projectBase
  .pick({ name: true, description: true, sampleTime: true, acceptanceBand: true })
  .partial()
  .refine((u) => Object.values(u).some((v) => v !== undefined), { message: 'Give a name, description, sample time or acceptance band to change.' });

export const memberAddSchema = z.object({ email: emailSchema });

export type ProjectCreate = z.infer<typeof projectCreateSchema>;
export type ProjectUpdate = z.infer<typeof projectUpdateSchema>;

export function toProject(row: ProjectRow): Project {
  return {
    id: row.id,
    name: row.name,
    slug: row.slug,
    description: row.description,
    sampleTime: row.sample_time,
    acceptanceBand:
      row.acceptance_min_frequency != null && row.acceptance_max_frequency != null
        ? { minFrequency: row.acceptance_min_frequency, maxFrequency: row.acceptance_max_frequency, maxError: row.acceptance_max_error ?? null }
        : null,
    createdAt: row.created_at.toISOString(),
  };
}

export async function findProjectBySlug(slug: string, trx: Knex | Knex.Transaction = db()): Promise<ProjectRow | undefined> {
  return trx<ProjectRow>('controller_projects').where({ slug }).first();
}

/** The project, or a 404 that names the slug the caller gave. */
export async function requireProject(slug: string, trx: Knex | Knex.Transaction = db()): Promise<ProjectRow> {
  const row = await findProjectBySlug(slug, trx);
  if (!row) throw notFound(`Controller project "${slug}"`);
  return row;
}

export async function projectAccess(projectId: string, user: SessionUser, trx: Knex | Knex.Transaction = db()): Promise<ProjectAccess> {
  const member = await trx('project_members').where({ project_id: projectId, user_id: user.id }).first('user_id');
  return { isMember: Boolean(member), canManage: Boolean(member) && user.role === 'engineer' };
}

/** Throws 403 unless the person is an engineer member of the project. */
export async function requireProjectManager(project: ProjectRow, user: SessionUser, trx: Knex | Knex.Transaction = db()): Promise<void> {
  const access = await projectAccess(project.id, user, trx);
  if (!access.canManage) {
    throw new ApiError(
      403,
      'forbidden',
      access.isMember
        ? `Only engineer members change controller project "${project.slug}".`
        : `You are not a member of controller project "${project.slug}"; ask one of its engineers to add you.`,
    );
  }
}

/** Throws 403 unless the person is a member of the project (any role). */
export async function requireProjectMember(project: ProjectRow, user: SessionUser, trx: Knex | Knex.Transaction = db()): Promise<void> {
  const access = await projectAccess(project.id, user, trx);
  if (!access.isMember) {
    throw new ApiError(403, 'forbidden', `Only members of controller project "${project.slug}" see its tokens.`);
  }
}

export interface ProjectSummary extends Project {
  memberCount: number;
  pinCount: number;
  isMember: boolean;
}

export async function listProjects(user: SessionUser): Promise<ProjectSummary[]> {
  const rows = await db()('controller_projects as p')
    .select(
      'p.*',
      db().raw('(SELECT count(*)::int FROM project_members m WHERE m.project_id = p.id) AS member_count'),
      db().raw('(SELECT count(*)::int FROM pins WHERE pins.project_id = p.id) AS pin_count'),
      db().raw('EXISTS (SELECT 1 FROM project_members m WHERE m.project_id = p.id AND m.user_id = ?) AS is_member', [user.id]),
    )
    .orderBy('p.name');
  return rows.map((r) => ({ ...toProject(r), memberCount: r.member_count, pinCount: r.pin_count, isMember: r.is_member }));
}

export async function createProject(input: ProjectCreate, actor: SessionUser, outer: Knex = db()): Promise<Project> {
  const slug = input.slug ?? slugFromName(input.name, 'project');
  return outer.transaction(async (trx) => {
    if (await findProjectBySlug(slug, trx)) {
      throw new ApiError(409, 'slug_taken', `A controller project with the slug "${slug}" already exists; choose another.`, 'slug');
    }
    const [row] = await trx<ProjectRow>('controller_projects')
      .insert({
        name: input.name,
        slug,
        description: input.description ?? '',
        sample_time: input.sampleTime ?? null,
        created_by: actor.id,
      })
      .returning('*');
    await trx('project_members').insert({ project_id: row.id, user_id: actor.id, added_by: actor.id });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project.created',
      subjectType: 'controller_project',
      subjectId: row.id,
      details: { slug, name: row.name, sampleTime: row.sample_time },
    });
    return toProject(row);
  });
}

export async function updateProject(slug: string, change: ProjectUpdate, actor: SessionUser, outer: Knex = db()): Promise<Project> {
  return outer.transaction(async (trx) => {
    const before = await requireProject(slug, trx);
    await requireProjectManager(before, actor, trx);
    const [row] = await trx<ProjectRow>('controller_projects')
      .where({ id: before.id })
      .update({
        ...(change.name !== undefined ? { name: change.name } : {}),
        ...(change.description !== undefined ? { description: change.description } : {}),
        ...(change.sampleTime !== undefined ? { sample_time: change.sampleTime } : {}),
        ...(change.acceptanceBand !== undefined
          ? {
              acceptance_min_frequency: change.acceptanceBand?.minFrequency ?? null,
              acceptance_max_frequency: change.acceptanceBand?.maxFrequency ?? null,
              acceptance_max_error: change.acceptanceBand?.maxError ?? null,
            }
          : {}),
        updated_at: trx.fn.now(),
      })
      .returning('*');
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project.updated',
      subjectType: 'controller_project',
      subjectId: row.id,
      details: { change },
    });
    return toProject(row);
  });
}

export async function listMembers(projectId: string, trx: Knex | Knex.Transaction = db()): Promise<ProjectMember[]> {
  const rows = await trx('project_members as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where('m.project_id', projectId)
    .select('u.id', 'u.name', 'u.email', 'u.role', 'u.active', 'm.added_at')
    .orderBy('u.name');
  return rows.map((r) => ({
    userId: r.id,
    name: r.name,
    email: r.email,
    role: r.role,
    active: r.active,
    addedAt: (r.added_at as Date).toISOString(),
  }));
}

export async function addMember(slug: string, email: string, actor: SessionUser, outer: Knex = db()): Promise<ProjectMember[]> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(slug, trx);
    await requireProjectManager(project, actor, trx);
    const user = await findUserByEmail(email, trx);
    if (!user || !user.active) {
      throw new ApiError(404, 'not_found', `Nobody with an active account has the address ${email}; an admin can invite them first.`, 'email');
    }
    const inserted = await trx('project_members')
      .insert({ project_id: project.id, user_id: user.id, added_by: actor.id })
      .onConflict(['project_id', 'user_id'])
      .ignore()
      .returning('user_id');
    if (inserted.length === 0) {
      throw new ApiError(409, 'already_member', `${user.email} is already a member of this project.`, 'email');
    }
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project.member_added',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { userId: user.id, email: user.email },
    });
    return listMembers(project.id, trx);
  });
}

export async function removeMember(slug: string, userId: string, actor: SessionUser, outer: Knex = db()): Promise<ProjectMember[]> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(slug, trx);
    await requireProjectManager(project, actor, trx);
    // Lock the membership rows so two engineers removing each other at once cannot both succeed.
    const members = await trx('project_members as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where('m.project_id', project.id)
      .forUpdate('m')
      .select('m.user_id', 'u.role', 'u.active');
    const leaving = members.find((m) => m.user_id === userId);
    if (!leaving) throw notFound('That member');
    const engineersLeft = members.filter((m) => m.user_id !== userId && m.role === 'engineer' && m.active);
    if (engineersLeft.length === 0) {
      throw new ApiError(409, 'last_engineer', 'A project needs at least one active engineer member to manage it; add another engineer first.');
    }
    await trx('project_members').where({ project_id: project.id, user_id: userId }).delete();
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'project.member_removed',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { userId },
    });
    return listMembers(project.id, trx);
  });
}
