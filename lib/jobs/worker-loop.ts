// The worker's loop: take one delivery at a time from the queues (analysis, reduction, input response),
// run it (runner.ts), and tell the queue how it ended; between deliveries, reap stale jobs (reaper.ts).
// Taking a delivery only when a slot is free, rather than subscribing, keeps a busy worker from holding
// jobs another worker could start now.
import type PgBoss from 'pg-boss';
import { runDelivery, releaseRunning, workerName } from './runner';
import { reapStaleJobs, staleSeconds, sweepUndispatched } from './reaper';
import { JOB_KINDS, QUEUE_NAMES, queue, type QueueMessage } from './queue';

export interface WorkerOptions {
  /** engine tasks run at once by this process (each in its own thread); default 1 */
  concurrency?: number;
  pollMs?: number;
  reapEveryMs?: number;
  log?: (line: string) => void;
}

export interface RunningWorker {
  readonly name: string;
  /** Stops taking work, hands running jobs back to the queue and waits for their threads to stop. */
  stop(reason?: string): Promise<void>;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export async function startWorker(options: WorkerOptions = {}): Promise<RunningWorker> {
  const concurrency = options.concurrency ?? 1;
  const pollMs = options.pollMs ?? 1000;
  const reapEveryMs = options.reapEveryMs ?? 5000;
  const log = options.log ?? ((line: string) => console.log(`[modeshelf worker ${workerName}] ${line}`));
  const boss: PgBoss = await queue('worker');
  let stopping = false;
  const inFlight = new Set<Promise<void>>();
  const releasing = new Set<string>();

  const handle = async (kind: (typeof JOB_KINDS)[number], job: PgBoss.JobWithMetadata<QueueMessage>) => {
    const name = QUEUE_NAMES[kind];
    const started = Date.now();
    try {
      const outcome = await runDelivery({ jobId: job.data.jobId, queueJobId: job.id, retryCount: job.retryCount, retryLimit: job.retryLimit });
      log(`${kind} job ${job.data.jobId}: ${outcome} after ${((Date.now() - started) / 1000).toFixed(1)} s`);
      // A superseded attempt's delivery belongs to whoever took the row over (the reaper or a shutdown).
      if (outcome !== 'superseded' && !releasing.has(job.data.jobId)) await boss.complete(name, job.id);
    } catch (err) {
      log(`${kind} job ${job.data.jobId}: attempt failed (${err instanceof Error ? err.message : String(err)})`);
      if (!releasing.has(job.data.jobId)) await boss.fail(name, job.id, { message: err instanceof Error ? err.message : String(err) });
    }
  };

  const loop = async () => {
    let next = 0;
    while (!stopping) {
      if (inFlight.size >= concurrency) {
        await Promise.race(inFlight);
        continue;
      }
      let took = false;
      for (let k = 0; k < JOB_KINDS.length && !stopping; k++) {
        // Start each round at the next queue, so a long line of one kind does not starve the others.
        const kind = JOB_KINDS[(next + k) % JOB_KINDS.length];
        const [job] = await boss.fetch<QueueMessage>(QUEUE_NAMES[kind], { batchSize: 1, includeMetadata: true }).catch((err: unknown) => {
          log(`fetch from ${kind} failed: ${err instanceof Error ? err.message : String(err)}`);
          return [] as PgBoss.JobWithMetadata<QueueMessage>[];
        });
        if (!job) continue;
        next = (next + k + 1) % JOB_KINDS.length;
        const p: Promise<void> = handle(kind, job).finally(() => inFlight.delete(p));
        inFlight.add(p);
        took = true;
        break;
      }
      if (!took) await sleep(pollMs);
    }
  };

  const reap = async () => {
    try {
      const reaped = await reapStaleJobs(boss, staleSeconds());
      if (reaped.length) log(`handed back ${reaped.length} job(s) whose worker stopped responding: ${reaped.join(', ')}`);
      await sweepUndispatched();
    } catch (err) {
      log(`reaper: ${err instanceof Error ? err.message : String(err)}`);
    }
  };
  await reap();
  const reaper = setInterval(reap, reapEveryMs);
  const looping = loop();
  log(`started (concurrency ${concurrency}, stale after ${staleSeconds()} s)`);

  return {
    name: workerName,
    async stop(reason = 'the worker was stopped') {
      stopping = true;
      clearInterval(reaper);
      const released = await releaseRunning(reason);
      for (const r of released) {
        releasing.add(r.jobId);
        if (r.queueJobId) await boss.fail(QUEUE_NAMES[r.kind as keyof typeof QUEUE_NAMES], r.queueJobId, { reason });
      }
      await Promise.allSettled([...inFlight]);
      await looping;
      log(`stopped${released.length ? `; handed back ${released.length} running job(s)` : ''}`);
    },
  };
}
