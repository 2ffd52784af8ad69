// POST /api/v1/projects/{project}/lock/verify — body: a modeshelf.lock.json. Answers whether it is still
// current, entry by entry (newer approved versions, retired, upstream changed, checksum, not pinned).
// Changes nothing but the token-use record.
import { parseJson, parseParams } from '@/lib/http';
import { lockFileSchema, verifyLockFile } from '@/lib/lockfile';
import { authenticatePullRequest, projectParamsSchema, pullRoute } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const POST = pullRoute<{ project: string }>(async (request, { params }) => {
  const { project } = await parseParams(params, projectParamsSchema);
  const caller = await authenticatePullRequest(request, project, 'any');
  const lock = await parseJson(request, lockFileSchema);
  return verifyLockFile(caller.project, lock);
});
