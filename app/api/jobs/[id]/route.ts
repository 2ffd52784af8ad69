// A background job's progress, polled by the pages (TanStack Query) while it runs.
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { getJob, jobIdSchema } from '@/lib/jobs/jobs';

export const dynamic = 'force-dynamic';

export const GET = route<{ id: string }>(async (_request, { params }) => {
  await requireRole();
  const { id } = await parseParams(params, jobIdSchema);
  return { job: await getJob(id) };
});
