// POST: the "retire" transition of lib/review/state-machine.ts, with { reason }. The role is checked before the
// body is read; the author rule and the version's current state are decided under the row lock in lib/.
import { requireRole } from '@/lib/auth';
import { parseJson, parseParams, route } from '@/lib/http';
import { TRANSITIONS } from '@/lib/review/state-machine';
import { transitionBodySchemas, transitionVersion, versionIdSchema } from '@/lib/reviews';

export const POST = route<{ id: string }>(async (request, { params }) => {
  const user = await requireRole(...TRANSITIONS.retire.roles);
  const { id } = await parseParams(params, versionIdSchema);
  const { reason } = await parseJson(request, transitionBodySchemas.retire);
  return transitionVersion(id, 'retire', user, reason);
});
