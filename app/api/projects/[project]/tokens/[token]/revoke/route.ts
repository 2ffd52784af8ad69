// POST /api/projects/{project}/tokens/{token}/revoke — the token stops working at once; engineer members.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { projectSlugSchema } from '@/lib/projects';
import { revokeProjectToken } from '@/lib/project-tokens';

const paramsSchema = z.object({ project: projectSlugSchema, token: z.uuid({ error: 'The token id must be a UUID.' }) });

export const POST = route<{ project: string; token: string }>(async (_request, { params }) => {
  const user = await requireRole('engineer');
  const { project, token } = await parseParams(params, paramsSchema);
  return { token: await revokeProjectToken(project, token, user) };
});
