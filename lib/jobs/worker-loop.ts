// The worker's loop: take one delivery at a time from the queues (analysis, reduction, input response) of
// the worker classes it serves (small, large; worker-class.ts) and run it (runner.ts, which settles the
// delivery together with the job's row); every few seconds, repair jobs whose worker died (reaper.ts).
// Taking a delivery only when a slot is free, rather than subscribing, keeps a busy worker from holding
// jobs another worker could start now. Each class has its own slots (`concurrency` each), so a worker
// serving both classes runs a small job beside a long large one instead of behind it.
import type PgBoss from 'pg-boss';
import { claimNext, releaseRunning, runClaimed, workerName, type Claimed } from './runner';
import { repairJobs, staleSeconds } from './reaper';
import { JOB_KINDS, queue, WORKER_CLASSES, type WorkerClass } from './queue';

export interface WorkerOptions {
  /** engine tasks run at once by this process for each class it serves (each in its own thread); default 1 */
  concurrency?: number;
  /** the worker classes whose queues it takes from; default both */
  classes?: readonly WorkerClass[];
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

/** Reads a class list such as "small,large" (`--classes`, MODESHELF_WORKER_CLASSES); throws naming a bad entry. */
export function parseWorkerClasses(text: string): WorkerClass[] {
  const entries = text.split(',').map((c) => c.trim()).filter(Boolean);
  if (entries.length === 0) throw new Error(`--classes needs one or more of ${WORKER_CLASSES.join(', ')}, separated by commas`);
  const out: WorkerClass[] = [];
  for (const c of entries) {
    if (!(WORKER_CLASSES as readonly string[]).includes(c)) throw new Error(`--classes: "${c}" is not a worker class; use ${WORKER_CLASSES.join(', ')}`);
    if (!out.includes(c as WorkerClass)) out.push(c as WorkerClass);
  }
  return out;
}

export async function startWorker(options: WorkerOptions = {}): Promise<RunningWorker> {
  const concurrency = options.concurrency ?? 1;
  const classes = options.classes && options.classes.length ? [...options.classes] : [...WORKER_CLASSES];
  const pollMs = options.pollMs ?? 1000;
  const reapEveryMs = options.reapEveryMs ?? REAP_EVERY_MS;
  const log = options.log ?? ((line: string) => console.log(`[modeshelf worker ${workerName}] ${line}`));
  const boss: PgBoss = await queue('worker');
  let stopping = false;
  const inFlight = new Set<Promise<void>>();

  const onStopped = (jobId: string, how: string) => log(`job ${jobId}: cancelled; ${how}`);
  const handle = async (claimed: Claimed) => {
    const started = Date.now();
    try {
      const outcome = await runClaimed(boss, claimed, { onStopped });
      log(`${claimed.workerClass} ${claimed.kind} job ${claimed.delivery.jobId}: ${outcome} after ${((Date.now() - started) / 1000).toFixed(1)} s`);
    } catch (err) {
      // Only a lost database connection gets here; the reaper mends the job once the heartbeat stops.
      log(`${claimed.kind} job ${claimed.delivery.jobId}: ${err instanceof Error ? err.message : String(err)}`);
    }
  };

  // One loop per class, each with its own slots.
  const loop = async (workerClass: WorkerClass) => {
    const slots = new Set<Promise<void>>();
    let next = 0;
    while (!stopping) {
      if (slots.size >= concurrency) {
        await Promise.race(slots);
        continue;
      }
      let took = false;
      for (let k = 0; k < JOB_KINDS.length && !stopping; k++) {
        // Start each round at the next queue, so a long line of one kind does not starve the others.
        const kind = JOB_KINDS[(next + k) % JOB_KINDS.length];
        const claimed = await claimNext(boss, kind, { workerClass }).catch((err: unknown) => {
          log(`fetch from ${workerClass} ${kind} failed: ${err instanceof Error ? err.message : String(err)}`);
          return null;
        });
        if (!claimed) continue;
        next = (next + k + 1) % JOB_KINDS.length;
        took = true;
        if (!claimed.row) {
          log(`${workerClass} ${kind} job ${claimed.delivery.jobId}: skipped (already finished)`);
          break;
        }
        const p: Promise<void> = handle(claimed).finally(() => {
          inFlight.delete(p);
          slots.delete(p);
        });
        inFlight.add(p);
        slots.add(p);
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
  const looping = Promise.all(classes.map((c) => loop(c)));
  log(`started (classes ${classes.join(', ')}; concurrency ${concurrency} per class; stale after ${staleSeconds()} s)`);

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
