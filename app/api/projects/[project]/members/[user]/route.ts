// DELETE /api/projects/{project}/members/{user} — remove a member; engineer members, never the last engineer.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { projectSlugSchema, removeMember } from '@/lib/projects';

const paramsSchema = z.object({ project: projectSlugSchema, user: z.uuid({ error: 'The member id must be a UUID.' }) });

export const DELETE = route<{ project: string; user: string }>(async (_request, { params }) => {
  const actor = await requireRole('engineer');
  const { project, user } = await parseParams(params, paramsSchema);
  return { members: await removeMember(project, user, actor) };
});
