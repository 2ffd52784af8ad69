// Database chores for the scripts and for developers: `npx tsx scripts/db.ts migrate|rollback|seed|status`.
// Uses DATABASE_URL (default: the local cluster of scripts/pg.sh).
import knex from 'knex';
import { knexConfig } from '../knexfile';
import { databaseUrl } from '../lib/config';

async function main(command: string | undefined): Promise<void> {
  const url = databaseUrl();
  const instance = knex(knexConfig(url));
  const where = url.replace(/\/\/([^:@/]+):[^@/]*@/, '//$1:***@');
  try {
    switch (command) {
      case 'migrate': {
        const [batch, names] = await instance.migrate.latest();
        console.log(names.length ? `migrated ${where} (batch ${batch}): ${names.join(', ')}` : `${where} is up to date`);
        break;
      }
      case 'rollback': {
        const [batch, names] = await instance.migrate.rollback();
        console.log(names.length ? `rolled back batch ${batch}: ${names.join(', ')}` : 'nothing to roll back');
        break;
      }
      case 'seed': {
        const [names] = await instance.seed.run();
        console.log(`seeded ${where}: ${names.map((n: string) => n.split('/').pop()).join(', ')}`);
        break;
      }
      case 'status': {
        const [done, pending] = await instance.migrate.list();
        console.log(`${where}: ${done.length} applied, ${pending.length} pending`);
        for (const p of pending) console.log(`  pending: ${p.file ?? p}`);
        break;
      }
      default:
        console.error('usage: tsx scripts/db.ts migrate|rollback|seed|status');
        process.exitCode = 2;
    }
  } finally {
    await instance.destroy();
  }
}

main(process.argv[2]).catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
