// Password hashing with bcrypt (bcryptjs: pure JavaScript, so no native build step). The rules a password
// must meet are in password-rules.ts.
import bcrypt from 'bcryptjs';
import { passwordSchema } from '@/lib/auth/password-rules';

export { passwordSchema } from '@/lib/auth/password-rules';

function rounds(): number {
  // Cost 11 is common practice for interactive sign-in; tests may lower it through BCRYPT_ROUNDS.
  const fromEnv = Number(process.env.BCRYPT_ROUNDS);
  return Number.isInteger(fromEnv) && fromEnv >= 4 && fromEnv <= 15 ? fromEnv : 11;
}

export async function hashPassword(password: string): Promise<string> {
  passwordSchema.parse(password);
  return bcrypt.hash(password, rounds());
}

// A real bcrypt hash (cost 11) of a random string, compared against when the e-mail names no account, so
// the answer takes as long as for a real account and timing does not tell which addresses exist.
const DUMMY_HASH = '$2b$11$61Ez2yaYVPkpcdn8j4fNo.vkl8Uma8kZxRTUj8N92P506Z3hhUgBO';

export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  if (!hash) {
    await bcrypt.compare(password, DUMMY_HASH);
    return false;
  }
  return bcrypt.compare(password, hash);
}
