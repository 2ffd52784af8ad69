import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { ApiError, parseJson, parseParams, route } from '@/lib/http';
import { personUpdateSchema, updatePerson } from '@/lib/people';

const paramsSchema = z.object({ id: z.uuid({ error: 'The person id must be a UUID.' }) });

export const PATCH = route<{ id: string }>(async (request, { params }) => {
  const admin = await requireRole('admin');
  const { id } = await parseParams(params, paramsSchema);
  const change = await parseJson(request, personUpdateSchema);
  if (id === admin.id && (change.active === false || (change.role && change.role !== 'admin'))) {
    throw new ApiError(409, 'self_change', 'You cannot deactivate yourself or give up your own admin role.', change.active === false ? 'active' : 'role');
  }
  return { person: await updatePerson(id, change, admin.id) };
});
