/**
 * What a caller may hand the engine's long loops: a stop flag looked at between iterations, and a report of
 * the count done so far. Framework-free: any object with a boolean `aborted` will do (a DOM/Node
 * `AbortSignal`, or one that reads a flag in a SharedArrayBuffer set by another thread). Nothing here knows
 * about jobs or threads; a loop that sees the flag set throws StoppedError and leaves no partial result.
 */
export interface StopSignal {
  readonly aborted: boolean;
}

/** Optional hooks of a long loop: the stop flag and a per-iteration report. */
export interface LoopHooks<Step> {
  readonly signal?: StopSignal;
  readonly onStep?: (step: Step) => void;
}

export class StoppedError extends Error {
  constructor(where: string) {
    super(`stopped on request during ${where}`);
    this.name = 'StoppedError';
  }
}

/** Throws StoppedError when the signal is set. */
export function throwIfStopped(signal: StopSignal | undefined, where: string): void {
  if (signal?.aborted) throw new StoppedError(where);
}
