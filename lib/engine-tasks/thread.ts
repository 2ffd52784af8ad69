// Entry of the worker thread that runs one engine task (run-task.ts starts it). The engine is synchronous
// and CPU-bound; running it here keeps the worker's own event loop free for heartbeats and the queue.
import { parentPort, workerData } from 'node:worker_threads';
import { runAnalysis } from './analysis-task';
import { runReduction } from './reduction-task';
import { runInputResponse } from './response-task';
import type { TaskRequest } from './tasks';

const port = parentPort;
if (!port) throw new Error('lib/engine-tasks/thread.ts must run in a worker thread');

const request = workerData as TaskRequest;
const report = (stage: string, fraction: number) => port.postMessage({ type: 'progress', stage, fraction });

try {
  let value: unknown;
  switch (request.task) {
    case 'analysis':
      value = runAnalysis(request.files, request.engineVersion, report);
      break;
    case 'reduction':
      value = runReduction(request.files, request.recipe, request.summary, request.engineVersion, report);
      break;
    case 'response':
      value = runInputResponse(request.files, request.matrices, request.signal, report);
      break;
    default:
      throw new Error(`unknown engine task ${(request as { task: string }).task}`);
  }
  port.postMessage({ type: 'result', value });
} catch (e) {
  const err = e as Error & { code?: string; field?: string };
  port.postMessage({
    type: 'error',
    error: { name: err?.name ?? 'Error', code: err?.code, field: err?.field, message: err?.message ?? String(e), stack: err?.stack },
  });
}
