// The local fake SMTP server, run beside the app by scripts/start.sh and scripts/test.sh:
//   npx tsx scripts/fake-smtp.ts      (SMTP_PORT, default 2525; DATABASE_URL for the outbox)
// Listens on 127.0.0.1 only, accepts every message, delivers none, files each into the outbox table.
import knex from 'knex';
import { databaseUrl, smtpSettings } from '../lib/config';
import { startFakeSmtp } from '../lib/mail/fake-smtp';

async function main(): Promise<void> {
  const db = knex({ client: 'pg', connection: databaseUrl(), pool: { min: 0, max: 4 } });
  const { port } = smtpSettings();
  const server = await startFakeSmtp(db, port);
  console.log(`fake SMTP listening on 127.0.0.1:${server.port}, filing mail into the outbox`);
  const stop = async () => {
    await server.close();
    await db.destroy();
    process.exit(0);
  };
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}

main().catch((err) => {
  console.error('fake SMTP could not start:', err instanceof Error ? err.message : err);
  process.exit(1);
});
