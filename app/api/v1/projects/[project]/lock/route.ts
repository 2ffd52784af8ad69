// GET /api/v1/projects/{project}/lock — modeshelf.lock.json for the project's pins as they resolve now.
import { z } from 'zod';
import { NextResponse } from 'next/server';
import { parseParams, parseQuery } from '@/lib/http';
import { buildLockFile, LOCKFILE_NAME } from '@/lib/lockfile';
import { authenticatePullRequest, projectParamsSchema, pullRoute } from '@/lib/pull-api';

export const dynamic = 'force-dynamic';

export const GET = pullRoute<{ project: string }>(async (request, { params }) => {
  const { project } = await parseParams(params, projectParamsSchema);
  const caller = await authenticatePullRequest(request, project, 'any');
  parseQuery(request, z.object({}).strict());
  const lock = await buildLockFile(caller.project);
  return new NextResponse(JSON.stringify(lock, null, 2) + '\n', {
    headers: {
      'content-type': 'application/json; charset=utf-8',
      'content-disposition': `attachment; filename="${LOCKFILE_NAME}"`,
      'cache-control': 'no-store',
    },
  });
});
