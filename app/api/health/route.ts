// Liveness for the start and test scripts: answers 200 when the database answers.
import { z } from 'zod';
import { db } from '@/lib/db';
import { ApiError, parseQuery, route } from '@/lib/http';

const query = z.object({}).strict();

export const dynamic = 'force-dynamic';

export const GET = route(async (request) => {
  parseQuery(request, query);
  try {
    await db().raw('select 1');
  } catch {
    throw new ApiError(503, 'database_unavailable', 'The database does not answer.');
  }
  return { status: 'ok' };
});
