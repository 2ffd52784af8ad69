// The comment thread and review history of a version. GET: anyone signed in; POST { body }: engineers,
// reviewers and admins (viewers read).
import { requireRole } from '@/lib/auth';
import { created, notFound, parseJson, parseParams, route } from '@/lib/http';
import { addComment, COMMENT_ROLES, commentBodySchema, reviewHistory, versionIdSchema, versionSummary } from '@/lib/review';

export const GET = route<{ id: string }>(async (_request, { params }) => {
  await requireRole();
  const { id } = await parseParams(params, versionIdSchema);
  if (!(await versionSummary(id))) throw notFound('That reduced model version');
  return { history: await reviewHistory(id) };
});

export const POST = route<{ id: string }>(async (request, { params }) => {
  const user = await requireRole(...COMMENT_ROLES);
  const { id } = await parseParams(params, versionIdSchema);
  const { body } = await parseJson(request, commentBodySchema);
  return created({ entry: await addComment(id, user, body) });
});
