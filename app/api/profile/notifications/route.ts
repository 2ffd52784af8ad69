// The signed-in person's own notification settings. Anyone signed in reads and changes their own only.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseJson, parseQuery, route } from '@/lib/http';
import { getPreferences, preferencesUpdateSchema, updatePreferences } from '@/lib/notifications';

export const GET = route(async (request) => {
  const user = await requireRole();
  parseQuery(request, z.object({}).strict());
  return { preferences: await getPreferences(user.id) };
});

export const PATCH = route(async (request) => {
  const user = await requireRole();
  const change = await parseJson(request, preferencesUpdateSchema);
  return { preferences: await updatePreferences(user.id, change) };
});
