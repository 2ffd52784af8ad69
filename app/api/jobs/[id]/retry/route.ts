// Sends a failed or cancelled job round again. Engineers run analyses and reductions, so they retry them.
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { jobIdSchema, retryJob } from '@/lib/jobs/jobs';

export const POST = route<{ id: string }>(async (_request, { params }) => {
  const user = await requireRole('engineer');
  const { id } = await parseParams(params, jobIdSchema);
  return { job: await retryJob(id, user) };
});
