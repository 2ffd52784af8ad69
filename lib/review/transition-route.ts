// The route handler of every review transition (POST /api/reduced-versions/{id}/submit|approve|revise|retire):
// the role is checked before the body is read (TRANSITIONS[action].roles), then the version id and the one
// text the transition needs ({ note }, { comment } or { reason }); the author rule and the version's current
// state are decided under the row lock (lib/review/transitions.ts).
import { requireRole } from '@/lib/auth';
import { parseJson, parseParams, route } from '@/lib/http';
import { TRANSITIONS, type ReviewAction } from '@/lib/review/state-machine';
import { transitionBodySchemas, versionIdSchema } from '@/lib/review/schemas';
import { transitionVersion } from '@/lib/review/transitions';

export function transitionRoute(action: ReviewAction) {
  const rule = TRANSITIONS[action];
  const schema = transitionBodySchemas[action];
  return route<{ id: string }>(async (request, { params }) => {
    const user = await requireRole(...rule.roles);
    const { id } = await parseParams(params, versionIdSchema);
    const body: Record<string, string> = await parseJson(request, schema);
    return transitionVersion(id, action, user, body[rule.textField]);
  });
}
