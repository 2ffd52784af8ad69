// Entry of the worker thread that runs one engine task (run-task.ts starts it). The engine is synchronous
// and CPU-bound; running it here keeps the worker's own event loop free for heartbeats and the queue.
//
// Stopping: the host sets a flag in shared memory (run-task.ts, stop). Every progress report looks at it
// and throws StoppedError once it is set, so a task stops at its next report; an engine loop that takes a
// signal (reduction/stop.ts: the low-rank ADI, the sparse frequency sweep) is to be given `stopSignal`,
// which reads the same flag, and then stops between its iterations: the analysis and reduction tasks take
// it (with the worker's memory budget for sparse factorizations) in their options.
import { parentPort, workerData } from 'node:worker_threads';
import { StoppedError, type StopSignal } from '../../reduction/index';
import { runAnalysis } from './analysis-task';
import { runReduction } from './reduction-task';
import { runSparseReduction } from './sparse-reduction-task';
import { runInputResponse } from './response-task';
import { enginePathOf, fetchFile, fetchModelFiles } from './model-files';
import type { ProgressDetail } from './progress';
import type { TaskRequest } from './tasks';

const port = parentPort;
if (!port) throw new Error('lib/engine-tasks/thread.ts must run in a worker thread');

const { request, stopFlag } = workerData as { request: TaskRequest; stopFlag: Int32Array };
const stopSignal: StopSignal = {
  get aborted() {
    return Atomics.load(stopFlag, 0) === 1;
  },
};
const report = (stage: string, fraction: number, detail?: ProgressDetail | null) => {
  if (stopSignal.aborted) throw new StoppedError(stage || 'the engine task');
  port.postMessage({ type: 'progress', stage, fraction, detail: detail ?? null });
};

/** What the tasks' engine loops take: the stop flag, and the memory budget the job was given (MiB → bytes). */
function taskOptions(memoryBudgetMiB: number | undefined) {
  return { signal: stopSignal, memoryBudgetBytes: memoryBudgetMiB !== undefined && memoryBudgetMiB > 0 ? memoryBudgetMiB * 2 ** 20 : undefined };
}

async function run(): Promise<unknown> {
  // Stored files are fetched into this worker's scratch folder first (lib/storage/scratch.ts): the engine
  // reads from this machine's disk, never from the web server's.
  const files = await fetchModelFiles(request.files);
  if (stopSignal.aborted) throw new StoppedError('fetching the model files');
  switch (request.task) {
    case 'analysis':
      return runAnalysis(files, request.engineVersion, report, taskOptions(request.memoryBudgetMiB));
    case 'reduction':
      // The large-model path has its own at-scale methods and comparison (sparse-reduction-task.ts).
      return enginePathOf(files) === 'sparse'
        ? runSparseReduction(files, request.recipe, request.summary, request.engineVersion, report, taskOptions(request.memoryBudgetMiB))
        : runReduction(files, request.recipe, request.summary, request.engineVersion, report);
    case 'response':
      return runInputResponse(files, request.matrices, { name: request.signal.name, path: await fetchFile(request.signal, 'signal') }, report, taskOptions(request.memoryBudgetMiB));
    default:
      throw new Error(`unknown engine task ${(request as { task: string }).task}`);
  }
}

void (async () => {
  try {
    const value = await run();
    port.postMessage({ type: 'result', value });
  } catch (e) {
    const err = e as Error & { code?: string; field?: string };
    port.postMessage({
      type: 'error',
      error: { name: err?.name ?? 'Error', code: err?.code, field: err?.field, message: err?.message ?? String(e), stack: err?.stack },
    });
  }
})();
