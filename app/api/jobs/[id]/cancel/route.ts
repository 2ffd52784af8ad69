// Cancels a queued or running job. Anyone who can queue a job (engineers; reviewers queue input-signal
// responses) gets past the role check; lib/jobs/jobs.ts then admits only the job's owner or an admin (403
// for anyone else) and answers 409 for a job that has already ended.
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { cancelJob, jobIdSchema } from '@/lib/jobs/jobs';

export const POST = route<{ id: string }>(async (_request, { params }) => {
  const user = await requireRole('engineer', 'reviewer', 'admin');
  const { id } = await parseParams(params, jobIdSchema);
  return { job: await cancelJob(id, user) };
});
