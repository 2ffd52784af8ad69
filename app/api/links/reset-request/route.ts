// Public: the Forgot password form. The answer is the same whether or not the address has an account.
import { z } from 'zod';
import { parseJson, route } from '@/lib/http';
import { emailSchema } from '@/lib/people';
import { requestPasswordReset } from '@/lib/account-links';

const body = z.object({ email: emailSchema });

export const POST = route(async (request) => {
  const { email } = await parseJson(request, body);
  await requestPasswordReset(email);
  return { message: `If ${email} has an account, a link to choose a new password is on its way. It works once, for an hour.` };
});
