// Jobs that can be stopped, sorted by size, and that say how far they are (issue 14).
//
//   - status 'cancelled': the job's owner or an admin stopped it (lib/jobs/jobs.ts, cancelJob). A queued job
//     is cancelled at once, with its queue delivery, in one transaction; a running one first gets
//     cancel_requested_at/by, and its worker stops the engine and writes 'cancelled' (lib/jobs/runner.ts), or
//     the reaper does when that worker is gone. The database keeps the shape: a cancelled job names who
//     asked, and only a running or cancelled job carries a request (sending it round again clears it).
//   - worker_class: 'small' or 'large', decided at enqueue from the model's size (lib/jobs/worker-class.ts);
//     each class has its own queues, so workers of one class never wait behind the other's jobs.
//   - progress_detail: counts within the current stage ({ done, total, atMost, unit, note }), and
//     stage_started_at / attempt_started_at, from which the time left is estimated (lib/jobs/progress-estimate.ts).
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.text('worker_class').notNullable().defaultTo('small');
    t.timestamp('cancel_requested_at', { useTz: true });
    t.uuid('cancel_requested_by').references('id').inTable('users').onDelete('RESTRICT');
    t.jsonb('progress_detail');
    t.timestamp('stage_started_at', { useTz: true });
    t.timestamp('attempt_started_at', { useTz: true });
  });
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_status_check');
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_status_check
    CHECK (status IN ('queued', 'running', 'succeeded', 'failed', 'cancelled'))`);
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_worker_class_check CHECK (worker_class IN ('small', 'large'))`);
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_cancel_request_check CHECK (
    (cancel_requested_at IS NULL) = (cancel_requested_by IS NULL)
    AND (cancel_requested_at IS NULL OR status IN ('running', 'cancelled'))
    AND (status <> 'cancelled' OR cancel_requested_at IS NOT NULL))`);
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_progress_detail_check
    CHECK (progress_detail IS NULL OR jsonb_typeof(progress_detail) = 'object')`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_progress_detail_check');
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_cancel_request_check');
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_worker_class_check');
  await knex.raw(`UPDATE jobs SET status = 'failed', error = COALESCE(error, 'cancelled') WHERE status = 'cancelled'`);
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_status_check');
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_status_check CHECK (status IN ('queued', 'running', 'succeeded', 'failed'))`);
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('attempt_started_at');
    t.dropColumn('stage_started_at');
    t.dropColumn('progress_detail');
    t.dropColumn('cancel_requested_by');
    t.dropColumn('cancel_requested_at');
    t.dropColumn('worker_class');
  });
}
