// GET /api/v1/projects/{project}/models/{model}/versions/{number}?format=json|csv|c&ts=… — one numbered
// approved or retired version of a model the project pins, e.g. to rebuild from a lock file (scope "pull").
// Answers with a strong ETag; If-None-Match with it gets 304 (lib/pull-api.ts, pullExport).
import { parseParams, parseQuery } from '@/lib/http';
import { exportQuerySchema } from '@/lib/exports';
import {
  authorisedLoad,
  findPinnedModel,
  pinContext,
  pinnedOr404,
  pinnedVersion,
  pullExport,
  pullRoute,
  versionNumber,
  versionParamsSchema,
} from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string; model: string; number: string }>(async (request, { params }) => {
  const { project, model, number } = await parseParams(params, versionParamsSchema);
  // The token check and the pin's query go together (one round trip); refusals come in the order they did.
  const { caller, value: found } = await authorisedLoad(request, project, 'pull', (projectId) => findPinnedModel(projectId, model));
  const version = versionNumber(number);
  const query = parseQuery(request, exportQuerySchema);
  const pin = pinnedOr404(found, model);
  return pullExport(request, {
    version: await pinnedVersion(pin, version),
    format: query.format,
    ts: query.ts,
    projectSampleTime: caller.project.sample_time,
    pin: pinContext(caller, pin),
  });
});
