// The job queue: pg-boss 10 in the application's own PostgreSQL (schema "pgboss"), so any number of
// workers on any number of machines share the work through the database, and a job survives every
// process. Our `jobs` table is the record people see (stage, fraction, error, result); a pg-boss job is
// only the delivery of "run jobs.id X" to one worker at a time, with its retries.
//
// Delivery rules (per queue): a failed attempt is retried after RETRY_DELAY_SECONDS, at most RETRY_LIMIT
// times; an attempt whose worker vanished is handed back by the heartbeat reaper (reaper.ts) long before
// pg-boss's own expiry (EXPIRE_SECONDS, the backstop for a reaper that is not running).
//
// Worker classes: every kind of job has one queue per class, 'small' and 'large' (worker-class.ts decides
// a job's class from its model's size when it is queued), so a worker serving only small jobs never waits
// behind a large one, and a worker serving both keeps separate slots for each (worker-loop.ts).
import PgBoss from 'pg-boss';
import type { Knex } from 'knex';
import { databaseUrl } from '@/lib/config';

export type JobKind = 'analysis' | 'reduction' | 'response';
export const JOB_KINDS: readonly JobKind[] = ['analysis', 'reduction', 'response'];

export type WorkerClass = 'small' | 'large';
export const WORKER_CLASSES: readonly WorkerClass[] = ['small', 'large'];

/**
 * MODESHELF_QUEUE_PREFIX namespaces the queues, so a test's workers take only that test's jobs while other
 * test files share the database; unset (the app, the worker, `npm test`'s browser run) it is empty.
 */
export function queuePrefix(): string {
  const prefix = process.env.MODESHELF_QUEUE_PREFIX ?? '';
  if (!/^[A-Za-z0-9_-]*$/.test(prefix)) throw new Error(`MODESHELF_QUEUE_PREFIX may hold letters, digits, _ and - only, got "${prefix}"`);
  return prefix;
}

const BASE_QUEUE_NAMES: Record<JobKind, string> = {
  analysis: 'modeshelf-analysis',
  reduction: 'modeshelf-reduction',
  response: 'modeshelf-response',
};

/** The queue of each kind of small job (read at each use, so a test can set its prefix first). */
export const QUEUE_NAMES: Readonly<Record<JobKind, string>> = new Proxy(BASE_QUEUE_NAMES, {
  get: (base, kind: string) => `${queuePrefix()}${base[kind as JobKind]}`,
});

/** The queue of a kind of job in a worker class: the small class keeps the original names, large ones end in "-large". */
export function queueNameOf(kind: JobKind, workerClass: WorkerClass): string {
  return workerClass === 'small' ? QUEUE_NAMES[kind] : `${QUEUE_NAMES[kind]}-large`;
}

/** Every queue: each kind in each class. */
export function allQueues(): { kind: JobKind; workerClass: WorkerClass; name: string }[] {
  return WORKER_CLASSES.flatMap((workerClass) => JOB_KINDS.map((kind) => ({ kind, workerClass, name: queueNameOf(kind, workerClass) })));
}

export const RETRY_LIMIT = 2;
export const RETRY_DELAY_SECONDS = 2;
export const EXPIRE_SECONDS = 4 * 3600;

/** MODESHELF_JOB_RETRY_DELAY_SECONDS overrides the delay before a retry (a test sets 0 for its own queues). */
export function retryDelaySeconds(): number {
  const raw = process.env.MODESHELF_JOB_RETRY_DELAY_SECONDS;
  const value = raw === undefined || raw === '' ? NaN : Number(raw);
  return Number.isInteger(value) && value >= 0 && value <= 3600 ? value : RETRY_DELAY_SECONDS;
}

/**
 * pg-boss's statements run on a Knex transaction's own connection (pg-boss's `db` option), so a change to
 * our `jobs` row and the change to its queue delivery commit together or not at all: the queue lives in
 * the same PostgreSQL.
 */
export function queueDb(trx: Knex.Transaction): PgBoss.Db {
  return {
    async executeSql(text: string, values: unknown[]) {
      // Inside a transaction Knex hands out the transaction's connection and never releases it early.
      const connection = (await trx.client.acquireConnection()) as { query(text: string, values: unknown[]): Promise<{ rows: unknown[] }> };
      return connection.query(text, values);
    },
  };
}

/**
 * Sends the delivery `queueId` of job `jobId` to its kind's queue in its class, inside `trx`; sending an id
 * that already exists does nothing.
 */
export async function sendDelivery(
  boss: PgBoss,
  trx: Knex.Transaction,
  job: { kind: JobKind; workerClass: WorkerClass },
  jobId: string,
  queueId: string,
): Promise<void> {
  const message: QueueMessage = { jobId };
  await boss.send(queueNameOf(job.kind, job.workerClass), message, {
    id: queueId,
    retryLimit: RETRY_LIMIT,
    retryDelay: retryDelaySeconds(),
    expireInSeconds: EXPIRE_SECONDS,
    db: queueDb(trx),
  });
}

export interface QueueMessage {
  jobId: string;
}

type Role = 'web' | 'worker';

const globalForBoss = globalThis as unknown as { modeshelfBoss?: { role: Role; url: string; started: Promise<PgBoss> } };

async function ensureQueues(boss: PgBoss): Promise<void> {
  for (const { name } of allQueues()) {
    if (await boss.getQueue(name)) continue;
    try {
      await boss.createQueue(name, {
        name,
        retryLimit: RETRY_LIMIT,
        retryDelay: retryDelaySeconds(),
        expireInSeconds: EXPIRE_SECONDS,
      });
    } catch (err) {
      // Another process created it between our look and our insert.
      if (!(await boss.getQueue(name))) throw err;
    }
  }
}

// PostgreSQL errors that two processes starting pg-boss at the same moment can meet while it creates or
// migrates its schema: a deadlock between their DDL, or an object the other one created first. The start
// is repeated with a fresh instance; any other error is final.
const TRANSIENT_START_ERRORS = new Set(['40P01', '40001', '23505', '42P07', '42710']);
const START_ATTEMPTS = 5;

async function startBoss(url: string, role: Role): Promise<PgBoss> {
  for (let attempt = 1; ; attempt++) {
    const boss = new PgBoss({
      connectionString: url,
      max: role === 'worker' ? 4 : 2,
      application_name: `modeshelf-${role}`,
      supervise: role === 'worker',
      schedule: false,
    });
    boss.on('error', (err) => console.error('[modeshelf] job queue error', err));
    try {
      await boss.start();
      await ensureQueues(boss);
      return boss;
    } catch (err) {
      await boss.stop({ graceful: false, close: true }).catch(() => undefined);
      const code = (err as { code?: unknown }).code;
      if (attempt >= START_ATTEMPTS || typeof code !== 'string' || !TRANSIENT_START_ERRORS.has(code)) throw err;
      await new Promise((resolve) => setTimeout(resolve, 150 * attempt + Math.random() * 150));
    }
  }
}

/**
 * The process's pg-boss instance, started once. The web server only sends ("web": no maintenance loop);
 * workers also run pg-boss's maintenance (expiry, archiving), which any number of them may do at once.
 */
export function queue(role: Role = 'web'): Promise<PgBoss> {
  const url = databaseUrl();
  const current = globalForBoss.modeshelfBoss;
  if (current && current.url === url && (current.role === role || current.role === 'worker')) return current.started;
  // A sender that becomes a worker (a script, a test), or a new database: the old connection goes.
  if (current) void current.started.then((b) => b.stop({ graceful: false, close: true })).catch(() => undefined);
  const started = startBoss(url, role);
  globalForBoss.modeshelfBoss = { role, url, started };
  started.catch(() => {
    if (globalForBoss.modeshelfBoss?.started === started) globalForBoss.modeshelfBoss = undefined;
  });
  return started;
}

/** Stops the process's queue connection (scripts, tests, worker shutdown). */
export async function closeQueue(): Promise<void> {
  const current = globalForBoss.modeshelfBoss;
  if (!current) return;
  globalForBoss.modeshelfBoss = undefined;
  const boss = await current.started.catch(() => null);
  await boss?.stop({ graceful: false, close: true, wait: true });
}
