// Shared set-up for integration tests: the real PostgreSQL test database (DATABASE_URL points at it; see
// vitest.config.ts), migrated once per run under an advisory lock so parallel test files do not race.
// Tests never truncate: each makes its own people with unique addresses, so files can run side by side.
// Only people.test.ts makes admins (its last-admin test counts every active admin); elsewhere use another role.
import { randomUUID } from 'node:crypto';
import knex from 'knex';
import { knexConfig } from '@/knexfile';
import { databaseUrl } from '@/lib/config';
import { db } from '@/lib/db';
import { hashPassword } from '@/lib/auth/passwords';
import type { Role } from '@/lib/roles';
import type { UserRow } from '@/lib/people';

const MIGRATION_LOCK = 7_424_001; // any constant; only our own test runs take it

export async function migrateTestDatabase(): Promise<void> {
  const url = databaseUrl();
  if (!/_test(\?|$)/.test(new URL(url).pathname + new URL(url).search)) {
    throw new Error(`Integration tests refuse to run against ${new URL(url).pathname}: the database name must end in _test`);
  }
  const instance = knex(knexConfig(url));
  try {
    await instance.raw('SELECT pg_advisory_lock(?)', [MIGRATION_LOCK]);
    await instance.migrate.latest();
    await instance.raw('SELECT pg_advisory_unlock(?)', [MIGRATION_LOCK]);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    throw new Error(
      `The test database is not reachable or not migratable (${message}). Start it with: bash scripts/pg.sh start`,
    );
  } finally {
    await instance.destroy();
  }
}

export function uniqueEmail(label: string): string {
  return `${label}-${randomUUID().slice(0, 8)}@test.quillmere.example`;
}

export function uniqueAddress(): string {
  const n = () => Math.floor(Math.random() * 250) + 1;
  return `198.51.${n()}.${n()}`; // TEST-NET-2 (RFC 5737): never a real client
}

export async function makeUser(options: {
  role?: Role;
  password?: string | null;
  active?: boolean;
  label?: string;
}): Promise<UserRow> {
  const password = options.password === undefined ? 'correct horse battery' : options.password;
  const [row] = await db()<UserRow>('users')
    .insert({
      email: uniqueEmail(options.label ?? options.role ?? 'person'),
      name: `Test ${options.label ?? options.role ?? 'person'}`,
      role: options.role ?? 'viewer',
      active: options.active ?? true,
      password_hash: password === null ? null : await hashPassword(password),
    })
    .returning('*');
  return row;
}
