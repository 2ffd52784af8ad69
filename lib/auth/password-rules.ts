// What a password must be. Kept free of server-only imports so the forms can show the same rules.
import { z } from 'zod';

export const MIN_PASSWORD_LENGTH = 10;
// bcrypt ignores everything after the first 72 bytes; refusing longer passwords keeps that from being a
// silent surprise.
export const MAX_PASSWORD_BYTES = 72;

function utf8Length(s: string): number {
  return new TextEncoder().encode(s).length;
}

export const passwordSchema = z
  .string({ error: 'Password is required.' })
  .min(MIN_PASSWORD_LENGTH, `Password must be at least ${MIN_PASSWORD_LENGTH} characters.`)
  .refine((p) => utf8Length(p) <= MAX_PASSWORD_BYTES, {
    message: `Password must be at most ${MAX_PASSWORD_BYTES} bytes (bcrypt reads no further).`,
  });
