// GET /api/v1/projects/{project}/models/{model}?format=json|csv|c&ts=<seconds>|project — the version the
// project's pin of that reduced model resolves to now, continuous or discretised (scope "pull"). Answers
// with a strong ETag; If-None-Match with it gets 304 (lib/pull-api.ts, pullExport).
import { parseParams, parseQuery } from '@/lib/http';
import { exportQuerySchema } from '@/lib/exports';
import { authenticatePullRequest, modelParamsSchema, pinContext, pullExport, pullRoute, requirePinnedModel, resolvedVersion } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string; model: string }>(async (request, { params }) => {
  const { project, model } = await parseParams(params, modelParamsSchema);
  const caller = await authenticatePullRequest(request, project, 'pull');
  const query = parseQuery(request, exportQuerySchema);
  const pin = await requirePinnedModel(caller, model);
  return pullExport(request, {
    version: resolvedVersion(pin),
    format: query.format,
    ts: query.ts,
    projectSampleTime: caller.project.sample_time,
    pin: pinContext(caller, pin),
  });
});
