// What each kind of job runs and writes. `prepare` reads what the engine task needs from the database
// (outside any transaction); `write` stores the task's result inside the job's finishing transaction, so
// the result and the job's "succeeded" stand or fall together.
import type { Knex } from 'knex';
import type { TaskRequest } from '@/lib/engine-tasks/tasks';
import type { AnalysisRecord, InputResponseRecord, ReductionRecord } from '@/lib/engine-tasks/records';
import type { AnalysisSummary } from '@/lib/engine-tasks/reduction-task';
import { ENGINE_VERSION } from '@/lib/engine-tasks/engine-version';
import { analysisOf, findSourceVersion, modelFilesOfVersion, writeAnalysis } from '@/lib/source-models';
import { findReducedVersion, recipeInputOf, registerReducedVersion, signalPathOf, type RecipeRow } from '@/lib/reduced-models';
import { db } from '@/lib/db';
import type { JobRow } from './jobs';
import type { JobKind } from './queue';
import { requireWithinMemoryBudget, workerMemoryBudgetMiB } from './memory-budget';
import { JobInputError } from './errors';

export { JobInputError } from './errors';

export interface JobHandler<R> {
  prepare(job: JobRow): Promise<TaskRequest>;
  write(trx: Knex.Transaction, job: JobRow, result: R): Promise<Record<string, unknown>>;
}

const analysis: JobHandler<AnalysisRecord> = {
  async prepare(job) {
    const version = await findSourceVersion(String(job.payload.sourceVersionId));
    if (!version) throw new JobInputError('the source version of this analysis no longer exists');
    // The upload's check said which engine path the model takes (payload.enginePath; absent: dense).
    const path = job.payload.enginePath === 'sparse' ? 'sparse' : 'dense';
    requireWithinMemoryBudget('analysis', { states: version.states, nonzeros: Number(version.nonzeros_a), path });
    return { task: 'analysis', files: modelFilesOfVersion(version), engineVersion: ENGINE_VERSION, memoryBudgetMiB: workerMemoryBudgetMiB() };
  },
  async write(trx, job, record) {
    const sourceVersionId = String(job.payload.sourceVersionId);
    await writeAnalysis(trx, sourceVersionId, record);
    return { sourceVersionId, states: record.states, wallMs: record.wallMs };
  },
};

const reduction: JobHandler<ReductionRecord> = {
  async prepare(job) {
    const version = await findSourceVersion(String(job.payload.sourceVersionId));
    if (!version) throw new JobInputError('the source version of this reduction no longer exists');
    const recipe = await db()<RecipeRow>('recipes').where({ id: String(job.payload.recipeId) }).first();
    if (!recipe) throw new JobInputError('the recipe of this reduction no longer exists');
    const record = await analysisOf(version.id);
    if (!record) throw new JobInputError('the source version has no analysis yet');
    requireWithinMemoryBudget('reduction', { states: version.states, nonzeros: Number(version.nonzeros_a), path: record.path ?? 'dense' });
    const summary: AnalysisSummary = {
      frequencyBand: record.frequencyBand,
      stablePartHInfinityNorm: record.stablePartHInfinityNorm,
      stiffnessRatio: record.stiffnessRatio,
      modes: record.modes,
      fastestDecayRate: record.fastestDecayRate,
      poles: record.poles,
      stabilityTolerance: record.stabilityTolerance,
    };
    return {
      task: 'reduction',
      files: modelFilesOfVersion(version),
      recipe: recipeInputOf(recipe),
      summary,
      engineVersion: ENGINE_VERSION,
      memoryBudgetMiB: workerMemoryBudgetMiB(),
    };
  },
  async write(trx, job, record) {
    const registered = await registerReducedVersion(trx, job, record);
    return { ...registered };
  },
};

const response: JobHandler<InputResponseRecord> = {
  async prepare(job) {
    const reduced = await findReducedVersion(String(job.payload.reducedVersionId));
    if (!reduced) throw new JobInputError('the reduced version no longer exists');
    const version = await findSourceVersion(reduced.source_version_id);
    if (!version) throw new JobInputError('the source version of the reduced model no longer exists');
    const path = (await analysisOf(version.id))?.path ?? 'dense';
    requireWithinMemoryBudget('response', { states: version.states, nonzeros: Number(version.nonzeros_a), path });
    return { task: 'response', files: modelFilesOfVersion(version), matrices: reduced.matrices, signal: signalPathOf(job.payload), memoryBudgetMiB: workerMemoryBudgetMiB() };
  },
  async write(_trx, _job, record) {
    return { ...record };
  },
};

export const HANDLERS: Record<JobKind, JobHandler<never>> = {
  analysis: analysis as JobHandler<never>,
  reduction: reduction as JobHandler<never>,
  response: response as JobHandler<never>,
};
