// GET: the review sheet of a version as the signed-in person sees it (what they may do, and why not).
import { requireRole } from '@/lib/auth';
import { notFound, parseParams, route } from '@/lib/http';
import { reviewSheet, versionIdSchema } from '@/lib/review';

export const GET = route<{ id: string }>(async (_request, { params }) => {
  const user = await requireRole();
  const { id } = await parseParams(params, versionIdSchema);
  const sheet = await reviewSheet(id, user);
  if (!sheet) throw notFound('That reduced model version');
  return sheet;
});
