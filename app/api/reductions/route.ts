// Runs a recipe on a source version: registers the recipe and queues the reduction job (202). The draft
// reduced-model version appears when the job has finished.
import { NextResponse } from 'next/server';
import { requireRole } from '@/lib/auth';
import { parseJson, route } from '@/lib/http';
import { reductionRequestSchema, requestReduction } from '@/lib/reduced-models';

export const POST = route(async (request) => {
  const user = await requireRole('engineer');
  const input = await parseJson(request, reductionRequestSchema);
  return NextResponse.json(await requestReduction(input, user), { status: 202 });
});
