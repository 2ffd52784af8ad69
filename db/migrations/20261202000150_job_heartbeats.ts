// Background jobs (issue 5): what a worker needs beyond the core jobs table.
//
//   - heartbeat_at and worker: a running job's worker writes a heartbeat every few seconds (its engine runs
//     in a worker thread, so the worker's own event loop stays free to do so). A job whose heartbeat is
//     older than the stale limit belongs to a worker that died; another worker hands it back to the queue
//     for a retry (lib/jobs/reaper.ts), so a crashed worker's job is picked up again rather than lost.
//   - attempt: the attempt that currently owns the row. Progress and results are written only by the owning
//     attempt, so a worker that was presumed dead and wakes up later cannot overwrite a newer attempt.
//   - kind 'response': the response of a reduced-model version and its source to an uploaded input signal
//     (the comparison page's optional CSV), which is a job like the others because the full model may be
//     large.
//
// The queue itself is pg-boss (schema "pgboss"), which installs and upgrades its own tables on start.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('jobs', (t) => {
    t.timestamp('heartbeat_at', { useTz: true });
    t.text('worker');
    t.integer('attempt').notNullable().defaultTo(0);
  });
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_kind_check');
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_kind_check CHECK (kind IN ('analysis', 'reduction', 'response'))`);
  // The page asks "the latest job for this subject" on every poll.
  await knex.raw('CREATE INDEX jobs_subject_created_idx ON jobs (subject_type, subject_id, created_at DESC)');
  await knex.raw(`CREATE INDEX jobs_running_heartbeat_idx ON jobs (heartbeat_at) WHERE status = 'running'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS jobs_running_heartbeat_idx');
  await knex.raw('DROP INDEX IF EXISTS jobs_subject_created_idx');
  await knex.raw(`DELETE FROM jobs WHERE kind = 'response'`);
  await knex.raw('ALTER TABLE jobs DROP CONSTRAINT jobs_kind_check');
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_kind_check CHECK (kind IN ('analysis', 'reduction'))`);
  await knex.schema.alterTable('jobs', (t) => {
    t.dropColumn('attempt');
    t.dropColumn('worker');
    t.dropColumn('heartbeat_at');
  });
}
