// The one Knex instance of the server process. Kept on globalThis so `next dev` module reloads do not
// open a new pool on every edit. Migrations and seeds are run by scripts/db.ts through knexfile.ts, never
// from the request path.
import knex, { type Knex } from 'knex';
import { databaseUrl } from '@/lib/config';

const globalForDb = globalThis as unknown as { modeshelfDb?: Knex };

export function db(): Knex {
  if (!globalForDb.modeshelfDb) {
    globalForDb.modeshelfDb = knex({ client: 'pg', connection: databaseUrl(), pool: { min: 0, max: 10 } });
  }
  return globalForDb.modeshelfDb;
}

/** Closes the pool (scripts and tests; the server keeps it for its lifetime). */
export async function closeDb(): Promise<void> {
  const instance = globalForDb.modeshelfDb;
  if (instance) {
    globalForDb.modeshelfDb = undefined;
    await instance.destroy();
  }
}
