// GET  /api/projects — controller projects, for any signed-in person.
// POST /api/projects — a new project; engineers only, who become its first member.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { created, parseJson, parseQuery, route } from '@/lib/http';
import { createProject, listProjects, projectCreateSchema } from '@/lib/projects';

export const GET = route(async (request) => {
  const user = await requireRole();
  parseQuery(request, z.object({}).strict());
  return { projects: await listProjects(user) };
});

export const POST = route(async (request) => {
  const user = await requireRole('engineer');
  const input = await parseJson(request, projectCreateSchema);
  return created({ project: await createProject(input, user) });
});
