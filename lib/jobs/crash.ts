// "Crash here" hooks for the job runner and the reaper: every boundary between two of their writes has a
// named point, and a caller (the fault-injection test) may pass a hook that is awaited there. A hook that
// throws SimulatedCrash stands for the process dying at that instant: the runner and the reaper let it
// through without writing anything more (no failure handling, no clean-up writes), a transaction open at
// that point is rolled back (as PostgreSQL does when a dead process's connection closes), and the engine
// thread is stopped. Any other error thrown by a hook is an ordinary failure at that point (e.g. an engine
// task that fails and is retried). Production code passes no hook.

/** The boundaries, in the order a job meets them. "…:in-transaction" points lie inside an open transaction. */
export const CRASH_POINTS = [
  'claim:fetched-in-transaction', // the delivery is taken, the row not yet claimed (same transaction)
  'run:claimed', // row running and delivery active, committed; the engine task not started
  'run:progress-written', // the first progress write is committed; the engine task is running
  'run:task-finished', // the engine's result is in memory; nothing of it written
  'result:written-in-transaction', // result and "succeeded" written, the delivery not yet completed (same transaction)
  'result:committed', // result, "succeeded" and the completed delivery committed
  'failure:written-in-transaction', // the failed attempt's row written, the delivery not yet failed (same transaction)
  'failure:committed', // the failed attempt's row and delivery committed
  'release:written-in-transaction', // shutdown: the row handed back, the delivery not yet failed (same transaction)
  'repair:delivery-failed-in-transaction', // reaper: a dead attempt's delivery failed, the row not yet updated
  'repair:redispatched-in-transaction', // reaper: a fresh delivery sent, the row not yet pointing at it
  'repair:committed', // reaper: one job's repair committed, the next not started
] as const;

export type CrashPoint = (typeof CRASH_POINTS)[number];

export type CrashHook = (point: CrashPoint, jobId: string) => void | Promise<void>;

/** Thrown by a hook to stand for the process dying at that point. */
export class SimulatedCrash extends Error {
  constructor(readonly point: CrashPoint) {
    super(`simulated crash at ${point}`);
    this.name = 'SimulatedCrash';
  }
}

export async function crashPoint(hook: CrashHook | undefined, point: CrashPoint, jobId: string): Promise<void> {
  if (hook) await hook(point, jobId);
}
