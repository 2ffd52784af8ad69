// PATCH  /api/projects/{project}/pins/{pin} — change how the pin resolves; engineer members.
// DELETE /api/projects/{project}/pins/{pin} — remove the pin; engineer members.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseJson, parseParams, route } from '@/lib/http';
import { projectSlugSchema } from '@/lib/projects';
import { deletePin, pinUpdateSchema, updatePin } from '@/lib/pins';

const paramsSchema = z.object({ project: projectSlugSchema, pin: z.uuid({ error: 'The pin id must be a UUID.' }) });

export const PATCH = route<{ project: string; pin: string }>(async (request, { params }) => {
  const user = await requireRole('engineer');
  const { project, pin } = await parseParams(params, paramsSchema);
  const change = await parseJson(request, pinUpdateSchema);
  return { pin: await updatePin(project, pin, change, user) };
});

export const DELETE = route<{ project: string; pin: string }>(async (_request, { params }) => {
  const user = await requireRole('engineer');
  const { project, pin } = await parseParams(params, paramsSchema);
  await deletePin(project, pin, user);
  return { removed: pin };
});
