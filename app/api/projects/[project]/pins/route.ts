// POST /api/projects/{project}/pins — pin a reduced model (exact version, or newest approved within limits);
// engineer members (checked in lib/pins).
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { created, parseJson, parseParams, route } from '@/lib/http';
import { projectSlugSchema } from '@/lib/projects';
import { createPin, pinInputSchema } from '@/lib/pins';

const paramsSchema = z.object({ project: projectSlugSchema });

export const POST = route<{ project: string }>(async (request, { params }) => {
  const user = await requireRole('engineer');
  const { project } = await parseParams(params, paramsSchema);
  const input = await parseJson(request, pinInputSchema);
  return created({ pin: await createPin(project, input, user) });
});
