// Knex settings used by scripts/db.ts (migrate, seed) and lib/db.ts. Migrations and seeds are TypeScript,
// loaded through tsx, so no compile step stands between a new migration and `npm run db:migrate`.
import type { Knex } from 'knex';
import path from 'node:path';
import { databaseUrl } from './lib/config';

export function knexConfig(connectionString: string = databaseUrl()): Knex.Config {
  return {
    client: 'pg',
    connection: connectionString,
    pool: { min: 0, max: 10 },
    migrations: {
      directory: path.join(__dirname, 'db', 'migrations'),
      extension: 'ts',
      loadExtensions: ['.ts'],
      tableName: 'knex_migrations',
    },
    seeds: {
      directory: path.join(__dirname, 'db', 'seeds'),
      extension: 'ts',
      loadExtensions: ['.ts'],
    },
  };
}

export default knexConfig();
