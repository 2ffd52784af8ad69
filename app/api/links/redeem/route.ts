// Public: the token in an invitation or reset link is the authority here, not a session.
import { parseJson, route } from '@/lib/http';
import { redeemSchema, redeemToken } from '@/lib/auth/tokens';

export const POST = route(async (request) => {
  const { token, password } = await parseJson(request, redeemSchema);
  const info = await redeemToken(token, password);
  return { email: info.email, purpose: info.purpose };
});
