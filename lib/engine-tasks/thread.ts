// Entry of the worker thread that runs one engine task (run-task.ts starts it). The engine is synchronous
// and CPU-bound; running it here keeps the worker's own event loop free for heartbeats and the queue.
import { parentPort, workerData } from 'node:worker_threads';
import { runAnalysis } from './analysis-task';
import { runReduction } from './reduction-task';
import { runInputResponse } from './response-task';
import { fetchFile, fetchModelFiles } from './model-files';
import type { TaskRequest } from './tasks';

const port = parentPort;
if (!port) throw new Error('lib/engine-tasks/thread.ts must run in a worker thread');

const request = workerData as TaskRequest;
const report = (stage: string, fraction: number) => port.postMessage({ type: 'progress', stage, fraction });

async function run(): Promise<unknown> {
  // Stored files are fetched into this worker's scratch folder first (lib/storage/scratch.ts): the engine
  // reads from this machine's disk, never from the web server's.
  const files = await fetchModelFiles(request.files);
  switch (request.task) {
    case 'analysis':
      return runAnalysis(files, request.engineVersion, report);
    case 'reduction':
      return runReduction(files, request.recipe, request.summary, request.engineVersion, report);
    case 'response':
      return runInputResponse(files, request.matrices, { name: request.signal.name, path: await fetchFile(request.signal, 'signal') }, report);
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
