// The engine tasks a worker thread can run, and what each takes. Type-only, shared by the thread and its host.
// Files are named by storage key (fetched by the thread, thread.ts) or, in tests, by a path on this machine.
import type { FileRef, ModelFileRef } from './model-files';
import type { AnalysisSummary, RecipeInput } from './reduction-task';
import type { ReducedMatricesRecord } from './records';

export type TaskRequest =
  | { task: 'analysis'; files: ModelFileRef[]; engineVersion: string; memoryBudgetMiB?: number }
  | { task: 'reduction'; files: ModelFileRef[]; recipe: RecipeInput; summary: AnalysisSummary; engineVersion: string; memoryBudgetMiB?: number }
  | { task: 'response'; files: ModelFileRef[]; matrices: ReducedMatricesRecord; signal: FileRef; memoryBudgetMiB?: number };
