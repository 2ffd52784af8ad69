// Liveness for the start and test scripts: answers 200 when the database answers.
import { z } from 'zod';
import { databaseAnswers } from '@/lib/health';
import { ApiError, parseQuery, route } from '@/lib/http';

const query = z.object({}).strict();

export const dynamic = 'force-dynamic';

export const GET = route(async (request) => {
  parseQuery(request, query);
  if (!(await databaseAnswers())) {
    throw new ApiError(503, 'database_unavailable', 'The database does not answer.');
  }
  return { status: 'ok' };
});
