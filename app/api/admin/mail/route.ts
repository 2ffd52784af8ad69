import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseQuery, route } from '@/lib/http';
import { listOutbox } from '@/lib/mail/outbox';

const query = z.object({
  limit: z.coerce.number({ error: 'limit must be a number.' }).int().min(1).max(500).default(100),
});

export const GET = route(async (request) => {
  await requireRole('admin');
  const { limit } = parseQuery(request, query);
  return { messages: await listOutbox(limit) };
});
