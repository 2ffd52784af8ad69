// The worker's loop: take one delivery at a time from the queues (analysis, reduction, input response) and
// run it (runner.ts, which settles the delivery together with the job's row); every few seconds, repair
// jobs whose worker died (reaper.ts).
// Taking a delivery only when a slot is free, rather than subscribing, keeps a busy worker from holding
// jobs another worker could start now.
import type PgBoss from 'pg-boss';
import { claimNext, releaseRunning, runClaimed, workerName, type Claimed } from './runner';
import { repairJobs, staleSeconds } from './reaper';
import { JOB_KINDS, queue } from './queue';

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

/** How often a worker runs the reaper (reaper.ts): the "one reaper period" a dead worker's job may wait beyond the stale limit. */
export const REAP_EVERY_MS = 5000;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export async function startWorker(options: WorkerOptions = {}): Promise<RunningWorker> {
  const concurrency = options.concurrency ?? 1;
  const pollMs = options.pollMs ?? 1000;
  const reapEveryMs = options.reapEveryMs ?? REAP_EVERY_MS;
  const log = options.log ?? ((line: string) => console.log(`[modeshelf worker ${workerName}] ${line}`));
  const boss: PgBoss = await queue('worker');
  let stopping = false;
  const inFlight = new Set<Promise<void>>();

  const handle = async (claimed: Claimed) => {
    const started = Date.now();
    try {
      const outcome = await runClaimed(boss, claimed);
      log(`${claimed.kind} job ${claimed.delivery.jobId}: ${outcome} after ${((Date.now() - started) / 1000).toFixed(1)} s`);
    } catch (err) {
      // Only a lost database connection gets here; the reaper mends the job once the heartbeat stops.
      log(`${claimed.kind} job ${claimed.delivery.jobId}: ${err instanceof Error ? err.message : String(err)}`);
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
        const claimed = await claimNext(boss, kind).catch((err: unknown) => {
          log(`fetch from ${kind} failed: ${err instanceof Error ? err.message : String(err)}`);
          return null;
        });
        if (!claimed) continue;
        next = (next + k + 1) % JOB_KINDS.length;
        took = true;
        if (!claimed.row) {
          log(`${kind} job ${claimed.delivery.jobId}: skipped (already finished)`);
          break;
        }
        const p: Promise<void> = handle(claimed).finally(() => inFlight.delete(p));
        inFlight.add(p);
        break;
      }
      if (!took) await sleep(pollMs);
    }
  };

  const reap = async () => {
    try {
      const repaired = await repairJobs(boss);
      const handedBack = repaired.filter((r) => r.problem === 'no heartbeat' || r.problem === 'taken, never claimed');
      if (handedBack.length) log(`handed back ${handedBack.length} job(s) whose worker stopped responding: ${handedBack.map((r) => `${r.jobId} (${r.repair})`).join(', ')}`);
      const other = repaired.filter((r) => !handedBack.includes(r));
      if (other.length) log(`repaired ${other.length} job(s): ${other.map((r) => `${r.jobId} (${r.problem}: ${r.repair})`).join(', ')}`);
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
      const released = await releaseRunning(boss, reason);
      await Promise.allSettled([...inFlight]);
      await looping;
      log(`stopped${released.length ? `; handed back ${released.length} running job(s)` : ''}`);
    },
  };
}
