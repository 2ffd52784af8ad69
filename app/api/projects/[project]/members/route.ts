// POST /api/projects/{project}/members — add a person by e-mail; engineer members (checked in lib/projects).
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { created, parseJson, parseParams, route } from '@/lib/http';
import { addMember, memberAddSchema, projectSlugSchema } from '@/lib/projects';

const paramsSchema = z.object({ project: projectSlugSchema });

export const POST = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole('engineer');
  const { project } = await parseParams(params, paramsSchema);
  const { email } = await parseJson(request, memberAddSchema);
  return created({ members: await addMember(project, email, user) });
});
