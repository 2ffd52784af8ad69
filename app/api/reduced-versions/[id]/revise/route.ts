// POST: the "revise" transition of lib/review/state-machine.ts, with { comment }. The role is checked before the
// body is read; the author rule and the version's current state are decided under the row lock in lib/.
import { requireRole } from '@/lib/auth';
import { parseJson, parseParams, route } from '@/lib/http';
import { TRANSITIONS } from '@/lib/review/state-machine';
import { transitionBodySchemas, transitionVersion, versionIdSchema } from '@/lib/reviews';

export const POST = route<{ id: string }>(async (request, { params }) => {
  const user = await requireRole(...TRANSITIONS.revise.roles);
  const { id } = await parseParams(params, versionIdSchema);
  const { comment } = await parseJson(request, transitionBodySchemas.revise);
  return transitionVersion(id, 'revise', user, comment);
});
