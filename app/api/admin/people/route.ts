import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { created, parseJson, parseQuery, route } from '@/lib/http';
import { inviteSchema, listPeople } from '@/lib/people';
import { invitePerson } from '@/lib/account-links';

export const GET = route(async (request) => {
  await requireRole('admin');
  parseQuery(request, z.object({}).strict());
  return { people: await listPeople() };
});

export const POST = route(async (request) => {
  const admin = await requireRole('admin');
  const input = await parseJson(request, inviteSchema);
  return created(await invitePerson(input, admin));
});
