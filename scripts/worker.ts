// One background worker (`npm run worker`; `npm start` runs one beside the app). Takes analysis, reduction
// and input-response jobs from the queue in PostgreSQL and runs each in a worker thread (lib/jobs). Start
// as many as the machine's cores allow; they share the queue. Uses DATABASE_URL like the app.
//
// One process per worker: scripts/worker.sh execs `node --import tsx scripts/worker.ts`, so this process is
// the one a supervisor starts and signals. SIGTERM / SIGINT: stop taking jobs, hand the running ones back
// to the queue (row and delivery together, lib/jobs/runner.ts releaseRunning), exit 0. A second signal
// during that exits at once (the reaper then mends what was in flight). Started by an npm script
// (`npm run worker`, `npm start`), the worker also stops when the npm process above it goes away, however
// it went, so killing what `npm run worker` started never leaves a worker running on its own.
//
//   MODESHELF_WORKER_CLASSES       worker classes served, e.g. "small" or "small,large" (default both;
//                                  lib/jobs/worker-class.ts). `npm run worker -- --classes small,large` sets it.
//   MODESHELF_WORKER_CONCURRENCY   engine tasks at once in this process for each class served (default 1).
//                                  `npm run worker -- --concurrency N` sets it.
//   MODESHELF_CANCEL_GRACE_MS      how long a cancelled job's engine may take to reach its next check before
//                                  its thread is terminated (default 2000)
//   MODESHELF_JOB_STALE_SECONDS    heartbeat silence after which a running job is handed back (default 60)
//   MODESHELF_WORKER_WATCH_PARENT  1: stop when the parent process goes; 0: never; unset: when started by npm
//   MODESHELF_WORKER_MEMORY_MIB    memory budget: a job whose estimated memory exceeds it is refused with both
//                                  figures (lib/jobs/memory-budget.ts); default 80 % of the machine's memory.
//                                  `npm run worker -- --memory MiB` sets it.
import { readFileSync } from 'node:fs';
import { closeDb } from '../lib/db';
import { closeQueue } from '../lib/jobs/queue';
import { parseWorkerClasses, startWorker, type RunningWorker } from '../lib/jobs/worker-loop';
import { startNotificationSender } from '../lib/notifications/sender';
import { workerMemoryBudgetMiB } from '../lib/jobs/memory-budget';
import { objectStore, verifyStore } from '../lib/storage';

/** A process's start time (field 22 of /proc/<pid>/stat), so a reused pid is not taken for the same process. */
function startTimeOf(pid: number): string | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // The command name (field 2) is in parentheses and may hold spaces: count fields after its ")".
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return fields[19] ?? null;
  } catch {
    return null;
  }
}

function parentOf(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) || null;
  } catch {
    return null;
  }
}

function isNpm(pid: number): boolean {
  try {
    // npm sets its process title ("npm run worker"), which replaces its argv: take words, not NUL-separated fields.
    const words = readFileSync(`/proc/${pid}/cmdline`, 'utf8').split(/[\0 ]/).slice(0, 2);
    return words.some((w) => /(^|\/)npm(-cli\.js)?$/.test(w));
  } catch {
    return false;
  }
}

/**
 * The processes whose end should end this worker: its parent, and when an npm script started it, every
 * process up to and including that npm (npm runs scripts through `sh -c`, which would otherwise survive
 * npm and keep the worker alive under no one). Empty when not watching, or where /proc is missing.
 */
function watchedAncestors(): { pid: number; started: string }[] {
  const setting = process.env.MODESHELF_WORKER_WATCH_PARENT;
  if (setting === '0') return [];
  const byNpm = Boolean(process.env.npm_lifecycle_event);
  if (setting !== '1' && !byNpm) return [];
  const chain: { pid: number; started: string }[] = [];
  let pid: number | null = process.ppid;
  for (let depth = 0; pid !== null && pid > 1 && depth < 6; depth++) {
    const started = startTimeOf(pid);
    if (started === null) break;
    chain.push({ pid, started });
    if (!byNpm || isNpm(pid)) break;
    pid = parentOf(pid);
  }
  // Started by npm but no npm found above (e.g. npx, or npm exec'd away): the parent alone.
  return byNpm && !chain.some((a) => isNpm(a.pid)) ? chain.slice(0, 1) : chain;
}

/** The value of `--name value` / `--name=value` on the command line, or undefined when not given. */
function flagValue(argv: readonly string[], name: string, example: string): string | undefined {
  const i = argv.findIndex((a) => a === `--${name}` || a.startsWith(`--${name}=`));
  if (i < 0) return undefined;
  const value = argv[i].includes('=') ? argv[i].slice(`--${name}=`.length) : argv[i + 1];
  if (value === undefined || value.startsWith('--')) throw new Error(`--${name} needs a value, e.g. --${name} ${example}`);
  return value;
}

/**
 * `--memory MiB` sets the memory budget, `--classes small,large` the worker classes served, `--concurrency N`
 * the engine tasks at once per class (each checked before starting, through the variables they set).
 */
function applyFlags(argv: readonly string[]): void {
  const memory = flagValue(argv, 'memory', '4096');
  if (memory !== undefined) process.env.MODESHELF_WORKER_MEMORY_MIB = memory;
  const classes = flagValue(argv, 'classes', 'small,large');
  if (classes !== undefined) process.env.MODESHELF_WORKER_CLASSES = classes;
  const concurrency = flagValue(argv, 'concurrency', '2');
  if (concurrency !== undefined) process.env.MODESHELF_WORKER_CONCURRENCY = concurrency;
}

/** Engine tasks at once per class: MODESHELF_WORKER_CONCURRENCY, a whole number ≥ 1 (default 1). */
function concurrencySetting(): number {
  const raw = process.env.MODESHELF_WORKER_CONCURRENCY;
  if (raw === undefined || raw.trim() === '') return 1;
  const v = Number(raw);
  if (!Number.isInteger(v) || v < 1) throw new Error(`MODESHELF_WORKER_CONCURRENCY (or --concurrency) must be a whole number ≥ 1, got "${raw}"`);
  return v;
}

async function main(): Promise<void> {
  applyFlags(process.argv.slice(2));
  const classes = parseWorkerClasses(process.env.MODESHELF_WORKER_CLASSES?.trim() || 'small,large');
  const concurrency = concurrencySetting();
  console.log(`[modeshelf worker] classes ${classes.join(', ')}, ${concurrency} engine task(s) at once per class`);
  // A budget that is not a number stops the worker here, with the reason, rather than failing every job.
  console.log(`[modeshelf worker] memory budget ${workerMemoryBudgetMiB()} MiB`);
  // A store this machine cannot write and read back stops the worker here, with the reason, instead of
  // failing every job it takes.
  const store = objectStore();
  await verifyStore(store);
  console.log(`[modeshelf worker] model store ${store.location} checked`);
  let worker: RunningWorker | null = null;
  let stopNotifications: (() => Promise<void>) | null = null;
  let stopping = false;
  const stop = async (why: string, repeated: 'exit' | 'ignore' = 'exit') => {
    if (stopping) {
      if (repeated === 'ignore') return;
      console.log(`[modeshelf worker] ${why} again: exiting now`);
      process.exit(1);
    }
    stopping = true;
    // Before the worker is ready nothing is claimed yet; whatever transaction is open rolls back as we go.
    if (!worker) process.exit(0);
    await worker.stop(`the worker got ${why}`);
    await stopNotifications?.();
    await closeQueue();
    await closeDb();
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGHUP', () => void stop('SIGHUP'));

  const ancestors = watchedAncestors();
  if (ancestors.length) {
    const watch = setInterval(() => {
      const gone = ancestors.find((a) => startTimeOf(a.pid) !== a.started);
      if (gone) {
        clearInterval(watch);
        void stop(`no parent (process ${gone.pid} ended)`, 'ignore');
      }
    }, 500);
    watch.unref();
  }

  worker = await startWorker({ concurrency, classes });
  // Review and project mail: retries, and notices for source versions registered by any process.
  stopNotifications = startNotificationSender();
}

main().catch((err) => {
  console.error('[modeshelf worker] could not start:', err instanceof Error ? err.message : err);
  process.exit(1);
});
