// The one Knex instance of the server process. Kept on globalThis so `next dev` module reloads do not
// open a new pool on every edit. Migrations and seeds are run by scripts/db.ts through knexfile.ts, never
// from the request path.
import knex, { type Knex } from 'knex';
import { databaseUrl } from '@/lib/config';

const globalForDb = globalThis as unknown as { modeshelfDb?: Knex };

export function db(): Knex {
  if (!globalForDb.modeshelfDb) {
    // Idle connections are kept five minutes (tarn's default is 30 s): opening one costs a backend start
    // and a SCRAM exchange, and a pool emptied between sporadic controller pulls made the first half
    // second of the next burst wait for ten of them (measured with scripts/load-pull.ts).
    globalForDb.modeshelfDb = knex({
      client: 'pg',
      connection: databaseUrl(),
      pool: { min: 0, max: 10, idleTimeoutMillis: 300_000 },
    });
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
