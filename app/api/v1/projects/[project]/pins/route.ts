// GET /api/v1/projects/{project}/pins — the project's pins and the version each resolves to now (any scope).
import { z } from 'zod';
import { parseParams, parseQuery } from '@/lib/http';
import { listProjectPins } from '@/lib/pins';
import { authenticatePullRequest, pinsBody, projectParamsSchema, pullRoute } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string }>(async (request, { params }) => {
  const { project } = await parseParams(params, projectParamsSchema);
  const caller = await authenticatePullRequest(request, project, 'any');
  parseQuery(request, z.object({}).strict());
  return pinsBody(caller, await listProjectPins(caller.project.id));
});
