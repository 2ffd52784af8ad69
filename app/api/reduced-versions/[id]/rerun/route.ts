// POST: re-run this version's recipe on the newest version of its source model. Answers 202 with the
// reduction job to poll (GET /api/jobs/{id}); the job registers the new draft.
import { NextResponse } from 'next/server';
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { versionIdSchema } from '@/lib/review';
import { RERUN_ROLES, rerunRecipe } from '@/lib/upstream';

export const POST = route<{ id: string }>(async (_request, { params }) => {
  const user = await requireRole(...RERUN_ROLES);
  const { id } = await parseParams(params, versionIdSchema);
  return NextResponse.json(await rerunRecipe(id, user), { status: 202 });
});
