// A secret handed out once — an invitation or reset link (lib/auth/tokens.ts), a controller project's pull
// token (lib/project-tokens.ts): 32 random bytes, base64url, of which only the SHA-256 is stored.
import { createHash, randomBytes } from 'node:crypto';

export function newSecretToken(): string {
  return randomBytes(32).toString('base64url');
}

/** The stored form: lower-case hex SHA-256 of the token's UTF-8 text. */
export function hashSecretToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
