// GET /api/v1/projects/{project}/pins — the project's pins and the version each resolves to now (any scope).
import { z } from 'zod';
import { parseParams, parseQuery } from '@/lib/http';
import { listProjectPins } from '@/lib/pins';
import { authorisedLoad, pinsBody, projectParamsSchema, pullRoute } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string }>(async (request, { params }) => {
  const { project } = await parseParams(params, projectParamsSchema);
  // The token check and the pins' query go together (one round trip); refusals come in the order they did.
  const { caller, value: pins } = await authorisedLoad(request, project, 'any', (projectId) => listProjectPins(projectId));
  parseQuery(request, z.object({}).strict());
  return pinsBody(caller, pins);
});
