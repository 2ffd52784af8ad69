// Mails a person a fresh link: a password reset, or the invitation again if they never accepted it.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseParams, route } from '@/lib/http';
import { sendLinkAsAdmin } from '@/lib/account-links';

const paramsSchema = z.object({ id: z.uuid({ error: 'The person id must be a UUID.' }) });

export const POST = route<{ id: string }>(async (_request, { params }) => {
  const admin = await requireRole('admin');
  const { id } = await parseParams(params, paramsSchema);
  return sendLinkAsAdmin(id, admin);
});
