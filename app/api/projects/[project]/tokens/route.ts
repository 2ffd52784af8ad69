// GET  /api/projects/{project}/tokens — the project's tokens and their use counts; members only.
// POST /api/projects/{project}/tokens — a new project token, answered once in full; engineer members.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { created, parseJson, parseParams, parseQuery, route } from '@/lib/http';
import { projectSlugSchema, requireProject } from '@/lib/projects';
import { createProjectToken, listProjectTokens, tokenCreateSchema } from '@/lib/project-tokens';

const paramsSchema = z.object({ project: projectSlugSchema });

export const GET = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole();
  const { project } = await parseParams(params, paramsSchema);
  parseQuery(request, z.object({}).strict());
  return { tokens: await listProjectTokens(await requireProject(project), user) };
});

export const POST = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole('engineer');
  const { project } = await parseParams(params, paramsSchema);
  const input = await parseJson(request, tokenCreateSchema);
  const { token, record } = await createProjectToken(project, input, user);
  return created({ token, record, notice: 'This is the only time the token is shown; store it where the controller build can read it.' });
});
