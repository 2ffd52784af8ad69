// The engine tasks a worker thread can run, and what each takes. Type-only, shared by the thread and its host.
import type { ModelFile } from './model-files';
import type { AnalysisSummary, RecipeInput } from './reduction-task';
import type { ReducedMatricesRecord } from './records';

export type TaskRequest =
  | { task: 'analysis'; files: ModelFile[]; engineVersion: string }
  | { task: 'reduction'; files: ModelFile[]; recipe: RecipeInput; summary: AnalysisSummary; engineVersion: string }
  | { task: 'response'; files: ModelFile[]; matrices: ReducedMatricesRecord; signal: { path: string; name: string } };

export type TaskName = TaskRequest['task'];
