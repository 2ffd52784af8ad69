// POST: after a revise decision, the author starts the next draft version (a copy that records the
// revised version as predecessor).
import { requireRole } from '@/lib/auth';
import { created, parseParams, route } from '@/lib/http';
import { NEXT_DRAFT_ROLES, startNextDraft, versionIdSchema } from '@/lib/review';

export const POST = route<{ id: string }>(async (_request, { params }) => {
  const user = await requireRole(...NEXT_DRAFT_ROLES);
  const { id } = await parseParams(params, versionIdSchema);
  return created({ version: await startNextDraft(id, user) });
});
