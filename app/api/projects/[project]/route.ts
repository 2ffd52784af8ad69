// GET   /api/projects/{project} — the project, its pins as they resolve now, its members; any signed-in person.
// PATCH /api/projects/{project} — name, description, sample time, acceptance band; engineer members (checked in lib/projects).
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseJson, parseParams, parseQuery, route } from '@/lib/http';
import { listMembers, projectAccess, projectSlugSchema, projectUpdateSchema, requireProject, toProject, updateProject } from '@/lib/projects';
import { listProjectPins } from '@/lib/pins';

const paramsSchema = z.object({ project: projectSlugSchema });

export const GET = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole();
  const { project: slug } = await parseParams(params, paramsSchema);
  parseQuery(request, z.object({}).strict());
  const project = await requireProject(slug);
  return {
    project: toProject(project),
    access: await projectAccess(project.id, user),
    pins: await listProjectPins(project.id),
    members: await listMembers(project.id),
  };
});

export const PATCH = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole('engineer');
  const { project } = await parseParams(params, paramsSchema);
  const change = await parseJson(request, projectUpdateSchema);
  return { project: await updateProject(project, change, user) };
});
