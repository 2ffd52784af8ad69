// One background worker (`npm run worker`; `npm start` runs one beside the app). Takes analysis, reduction
// and input-response jobs from the queue in PostgreSQL and runs each in a worker thread (lib/jobs). Start
// as many as the machine's cores allow; they share the queue. Uses DATABASE_URL like the app.
//
//   MODESHELF_WORKER_CONCURRENCY   engine tasks at once in this process (default 1)
//   MODESHELF_JOB_STALE_SECONDS    heartbeat silence after which a running job is handed back (default 60)
import { closeDb } from '../lib/db';
import { closeQueue } from '../lib/jobs/queue';
import { startWorker } from '../lib/jobs/worker-loop';
import { startNotificationSender } from '../lib/notification-sender';

async function main(): Promise<void> {
  const concurrency = Math.max(1, Number(process.env.MODESHELF_WORKER_CONCURRENCY) || 1);
  const worker = await startWorker({ concurrency });
  // Review and project mail: retries, and notices for source versions registered by any process.
  const stopNotifications = startNotificationSender();
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    await worker.stop(`the worker got ${signal}`);
    await stopNotifications();
    await closeQueue();
    await closeDb();
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((err) => {
  console.error('[modeshelf worker] could not start:', err instanceof Error ? err.message : err);
  process.exit(1);
});
