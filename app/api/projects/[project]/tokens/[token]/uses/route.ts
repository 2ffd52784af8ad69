// GET /api/projects/{project}/tokens/{token}/uses — when and from where the token was used; members only.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseParams, parseQuery, route } from '@/lib/http';
import { projectSlugSchema, requireProject } from '@/lib/projects';
import { listTokenUses } from '@/lib/project-tokens';

const paramsSchema = z.object({ project: projectSlugSchema, token: z.uuid({ error: 'The token id must be a UUID.' }) });

export const GET = route<{ project: string; token: string }>(async (request, { params }) => {
  const user = await requireRole();
  const { project, token } = await parseParams(params, paramsSchema);
  parseQuery(request, z.object({}).strict());
  return { uses: await listTokenUses(await requireProject(project), token, user) };
});
