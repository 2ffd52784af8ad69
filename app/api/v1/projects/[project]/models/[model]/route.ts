// GET /api/v1/projects/{project}/models/{model}?format=json|csv|c&ts=<seconds>|project — the version the
// project's pin of that reduced model resolves to now, continuous or discretised (scope "pull"). Answers
// with a strong ETag; If-None-Match with it gets 304 (lib/pull-api.ts, pullExport).
import { parseParams, parseQuery } from '@/lib/http';
import { exportQuerySchema } from '@/lib/exports';
import { authorisedLoad, findPinnedModel, modelParamsSchema, pinContext, pinnedOr404, pullExport, pullRoute, resolvedVersion } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string; model: string }>(async (request, { params }) => {
  const { project, model } = await parseParams(params, modelParamsSchema);
  // The token check and the pin's query go together (one round trip); refusals come in the order they did.
  const { caller, value: found } = await authorisedLoad(request, project, 'pull', (projectId) => findPinnedModel(projectId, model));
  const query = parseQuery(request, exportQuerySchema);
  const pin = pinnedOr404(found, model);
  return pullExport(request, {
    version: resolvedVersion(pin),
    format: query.format,
    ts: query.ts,
    projectSampleTime: caller.project.sample_time,
    pin: pinContext(caller, pin),
  });
});
