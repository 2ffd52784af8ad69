// Password rules and hashing (bcrypt through bcryptjs, pure JavaScript, so no native build step).
import bcrypt from 'bcryptjs';
import { z } from 'zod';

export const MIN_PASSWORD_LENGTH = 10;
// bcrypt ignores everything after the first 72 bytes; refusing longer passwords keeps that from being a
// silent surprise.
export const MAX_PASSWORD_BYTES = 72;

export const passwordSchema = z
  .string({ error: 'Password is required.' })
  .min(MIN_PASSWORD_LENGTH, `Password must be at least ${MIN_PASSWORD_LENGTH} characters.`)
  .refine((p) => Buffer.byteLength(p, 'utf8') <= MAX_PASSWORD_BYTES, {
    message: `Password must be at most ${MAX_PASSWORD_BYTES} bytes (bcrypt reads no further).`,
  });

function rounds(): number {
  // Cost 11 is common practice for interactive sign-in; tests may lower it through BCRYPT_ROUNDS.
  const fromEnv = Number(process.env.BCRYPT_ROUNDS);
  return Number.isInteger(fromEnv) && fromEnv >= 4 && fromEnv <= 15 ? fromEnv : 11;
}

export async function hashPassword(password: string): Promise<string> {
  passwordSchema.parse(password);
  return bcrypt.hash(password, rounds());
}

// A real bcrypt hash of a random string, compared against when the e-mail names no account, so the
// answer takes as long as for a real account and timing does not tell which addresses exist.
const DUMMY_HASH = '$2b$11$61Ez2yaYVPkpcdn8j4fNo.vkl8Uma8kZxRTUj8N92P506Z3hhUgBO';

export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  if (!hash) {
    await bcrypt.compare(password, DUMMY_HASH);
    return false;
  }
  return bcrypt.compare(password, hash);
}
