// GET: the review queue (versions in review, oldest first) and the latest decisions.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseQuery, route } from '@/lib/http';
import { recentDecisions, reviewQueue } from '@/lib/review';

export const GET = route(async (request) => {
  const user = await requireRole();
  parseQuery(request, z.object({}).strict());
  const [queue, decisions] = await Promise.all([reviewQueue(user), recentDecisions()]);
  return { queue, decisions };
});
