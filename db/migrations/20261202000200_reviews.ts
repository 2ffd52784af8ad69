// Review and approval of reduced-model versions, notifications, and upstream changes (issue 6).
//
// What the database itself refuses, so that no code path (a route, a script, a hand-typed UPDATE) can make
// an impossible record:
//   - a status change that is not one of the life's transitions (lib/review/state-machine.ts): draft → in_review →
//     approved | revise, approved → retired; revise and retired are terminal;
//   - an approved (or later retired) version without who approved it, when, and the accuracy figures they
//     saw (the approval snapshot); an approver who is the version's author (four-eyes rule);
//   - a retired version without who retired it, when and why;
//   - a change to the matrices or the lineage of a version once it has left draft (frozen: a change needs a
//     new version), a change to a recorded approval, submission or retirement, or deleting such a version;
//   - a review decision (approve, revise) by the version's author, a submission by anyone else, or
//     editing or deleting the review history (append-only, like audit_events).
//
// "Upstream changed" is not stored: a flag could disagree with the source versions it summarises. The view
// reduced_version_upstream derives it from version numbers: a reduced version is upstream-changed when its
// source model has a version with a greater number than the one it was reduced from.
import type { Knex } from 'knex';

// Columns that say what a reduced version is; once it has been submitted they never change.
const DEFINING_COLUMNS = [
  'reduced_model_id',
  'number',
  'source_version_id',
  'recipe_id',
  'predecessor_id',
  'order',
  'states_kept_unstable',
  'matrices',
  'matrices_sha256',
  'input_checksum',
  'engine_version',
  'author_id',
];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('reduced_versions', (t) => {
    t.timestamp('submitted_at', { useTz: true });
    t.uuid('approved_by').references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('approved_at', { useTz: true });
    // accuracy_reports.figures (and the matrices digest) as they stood when the approval was given.
    t.jsonb('approved_figures');
    t.uuid('retired_by').references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('retired_at', { useTz: true });
    t.text('retired_reason');
  });
  await knex.raw(`ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_submission_check
    CHECK ((status = 'draft') = (submitted_at IS NULL))`);
  await knex.raw(`ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_approval_check
    CHECK (CASE WHEN status IN ('approved', 'retired')
                THEN approved_by IS NOT NULL AND approved_at IS NOT NULL AND approved_figures IS NOT NULL
                     AND approved_at >= submitted_at
                ELSE approved_by IS NULL AND approved_at IS NULL AND approved_figures IS NULL END)`);
  await knex.raw(`ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_four_eyes_check
    CHECK (approved_by IS NULL OR approved_by <> author_id)`);
  await knex.raw(`ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_retirement_check
    CHECK (CASE WHEN status = 'retired'
                THEN retired_by IS NOT NULL AND retired_at IS NOT NULL AND retired_at >= approved_at
                     AND retired_reason IS NOT NULL AND btrim(retired_reason) <> ''
                ELSE retired_by IS NULL AND retired_at IS NULL AND retired_reason IS NULL END)`);
  // Lets reviews carry the version's author under a foreign key, so the four-eyes rule on decisions is a
  // plain CHECK on the reviews row.
  await knex.raw('ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_id_author_unique UNIQUE (id, author_id)');
  await knex.raw('CREATE INDEX reduced_versions_status_index ON reduced_versions (status)');
  await knex.raw('CREATE INDEX reduced_versions_predecessor_index ON reduced_versions (predecessor_id)');

  const definingChanged = DEFINING_COLUMNS.map((c) => `NEW."${c}" IS DISTINCT FROM OLD."${c}"`).join(' OR ');
  await knex.raw(`
    CREATE FUNCTION reduced_versions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP = 'DELETE' THEN
        IF OLD.status <> 'draft' THEN
          RAISE EXCEPTION 'reduced version % is %: only a draft can be deleted', OLD.id, OLD.status
            USING ERRCODE = 'restrict_violation', CONSTRAINT = 'reduced_versions_frozen';
        END IF;
        RETURN OLD;
      END IF;
      IF NEW.status IS DISTINCT FROM OLD.status AND NOT (
           (OLD.status = 'draft' AND NEW.status = 'in_review')
        OR (OLD.status = 'in_review' AND NEW.status IN ('approved', 'revise'))
        OR (OLD.status = 'approved' AND NEW.status = 'retired')) THEN
        RAISE EXCEPTION 'reduced version %: % -> % is not a step of the review life', OLD.id, OLD.status, NEW.status
          USING ERRCODE = 'check_violation', CONSTRAINT = 'reduced_versions_transition';
      END IF;
      IF OLD.status <> 'draft' AND (${definingChanged}) THEN
        RAISE EXCEPTION 'reduced version % is %: its matrices and lineage are frozen; register a new version instead', OLD.id, OLD.status
          USING ERRCODE = 'check_violation', CONSTRAINT = 'reduced_versions_frozen';
      END IF;
      IF (OLD.submitted_at IS NOT NULL AND NEW.submitted_at IS DISTINCT FROM OLD.submitted_at)
        OR (OLD.approved_at IS NOT NULL AND (NEW.approved_at IS DISTINCT FROM OLD.approved_at
            OR NEW.approved_by IS DISTINCT FROM OLD.approved_by OR NEW.approved_figures IS DISTINCT FROM OLD.approved_figures))
        OR (OLD.retired_at IS NOT NULL AND (NEW.retired_at IS DISTINCT FROM OLD.retired_at
            OR NEW.retired_by IS DISTINCT FROM OLD.retired_by OR NEW.retired_reason IS DISTINCT FROM OLD.retired_reason)) THEN
        RAISE EXCEPTION 'reduced version %: a recorded submission, approval or retirement cannot be changed', OLD.id
          USING ERRCODE = 'check_violation', CONSTRAINT = 'reduced_versions_frozen';
      END IF;
      RETURN NEW;
    END
    $$`);
  await knex.raw(`CREATE TRIGGER reduced_versions_guard BEFORE UPDATE OR DELETE ON reduced_versions
    FOR EACH ROW EXECUTE FUNCTION reduced_versions_guard()`);

  // The review history of each version: submissions with the author's note, decisions with the reviewer's
  // comment, retirements with their reason, and the comment thread. One table so the history reads in order.
  await knex.schema.createTable('reviews', (t) => {
    t.bigIncrements('id').primary();
    t.uuid('reduced_version_id').notNullable();
    t.uuid('version_author_id').notNullable(); // the version's author, held under the foreign key below
    t.uuid('actor_id').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.text('event').notNullable(); // 'submitted' | 'approved' | 'revise' | 'retired' | 'comment'
    t.text('from_status'); // null for comments
    t.text('to_status');
    t.text('body').notNullable(); // the note, comment or reason
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.foreign(['reduced_version_id', 'version_author_id'])
      .references(['id', 'author_id'])
      .inTable('reduced_versions')
      .onDelete('RESTRICT');
    t.index(['reduced_version_id', 'id']);
    t.index(['created_at']);
  });
  await knex.raw(`ALTER TABLE reviews ADD CONSTRAINT reviews_event_check CHECK (
       (event = 'submitted' AND from_status = 'draft' AND to_status = 'in_review')
    OR (event = 'approved' AND from_status = 'in_review' AND to_status = 'approved')
    OR (event = 'revise' AND from_status = 'in_review' AND to_status = 'revise')
    OR (event = 'retired' AND from_status = 'approved' AND to_status = 'retired')
    OR (event = 'comment' AND from_status IS NULL AND to_status IS NULL))`);
  await knex.raw(`ALTER TABLE reviews ADD CONSTRAINT reviews_body_check
    CHECK (btrim(body) <> '' AND char_length(body) <= 4000)`);
  await knex.raw(`ALTER TABLE reviews ADD CONSTRAINT reviews_four_eyes_check
    CHECK (event NOT IN ('approved', 'revise') OR actor_id <> version_author_id)`);
  await knex.raw(`ALTER TABLE reviews ADD CONSTRAINT reviews_submitted_by_author_check
    CHECK (event <> 'submitted' OR actor_id = version_author_id)`);
  await knex.raw(`
    CREATE FUNCTION reviews_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'the review history is append-only: % refused', TG_OP
        USING ERRCODE = 'insufficient_privilege';
    END
    $$`);
  await knex.raw(`CREATE TRIGGER reviews_no_update_delete BEFORE UPDATE OR DELETE ON reviews
    FOR EACH ROW EXECUTE FUNCTION reviews_refuse_change()`);
  await knex.raw(`CREATE TRIGGER reviews_no_truncate BEFORE TRUNCATE ON reviews
    FOR EACH STATEMENT EXECUTE FUNCTION reviews_refuse_change()`);

  // Which mails each person wants. No row means the defaults: all of them.
  await knex.schema.createTable('notification_preferences', (t) => {
    t.uuid('user_id').primary().references('id').inTable('users').onDelete('CASCADE');
    t.boolean('review_requested').notNullable().defaultTo(true); // reviewers: a version was submitted
    t.boolean('review_decided').notNullable().defaultTo(true); // authors: approved or sent back for revision
    t.boolean('upstream_changed').notNullable().defaultTo(true); // authors: the source model has a new version
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  // Mail to send: written in the transaction of the change it tells about, sent after commit by the
  // sender (lib/notifications.ts), retried with back-off, never rolled back with a failed send.
  await knex.schema.createTable('mail_queue', (t) => {
    t.bigIncrements('id').primary();
    t.text('kind').notNullable();
    t.uuid('recipient_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('to_address').notNullable();
    t.text('subject').notNullable();
    t.text('text_body').notNullable();
    t.text('html_body').notNullable();
    // Set where one event must mail a person once only however often it is noticed (upstream changes).
    t.text('dedupe_key').unique();
    t.text('status').notNullable().defaultTo('pending');
    t.integer('attempts').notNullable().defaultTo(0);
    t.timestamp('next_attempt_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('claimed_until', { useTz: true }); // a sender working on it; past it, another may take over
    t.text('last_error');
    t.text('message_id');
    t.timestamp('sent_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_kind_check
    CHECK (kind IN ('review_requested', 'review_decided', 'upstream_changed'))`);
  await knex.raw(`ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_status_check
    CHECK (status IN ('pending', 'sending', 'sent', 'failed'))`);
  await knex.raw(`ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_sent_check CHECK ((status = 'sent') = (sent_at IS NOT NULL))`);
  await knex.raw('ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_attempts_check CHECK (attempts >= 0)');
  await knex.raw(`CREATE INDEX mail_queue_due_index ON mail_queue (next_attempt_at) WHERE status IN ('pending', 'sending')`);

  // Source versions whose "upstream changed" mails have been queued, so the sender's sweep handles each once.
  await knex.schema.createTable('upstream_notices', (t) => {
    t.uuid('source_version_id').primary().references('id').inTable('source_versions').onDelete('CASCADE');
    t.timestamp('queued_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer('recipients').notNullable().defaultTo(0);
  });
  // Versions registered before this migration are not news.
  await knex.raw('INSERT INTO upstream_notices (source_version_id) SELECT id FROM source_versions');

  await knex.raw(`
    CREATE VIEW reduced_version_upstream AS
    SELECT rv.id AS reduced_version_id,
           rv.reduced_model_id,
           sv.source_model_id,
           sv.id AS source_version_id,
           sv.number AS source_number,
           newest.id AS newest_source_version_id,
           newest.number AS newest_source_number,
           newest.number > sv.number AS upstream_changed
      FROM reduced_versions rv
      JOIN source_versions sv ON sv.id = rv.source_version_id
      JOIN LATERAL (
        SELECT s.id, s.number FROM source_versions s
         WHERE s.source_model_id = sv.source_model_id
         ORDER BY s.number DESC LIMIT 1
      ) newest ON true`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP VIEW IF EXISTS reduced_version_upstream');
  await knex.schema.dropTableIfExists('upstream_notices');
  await knex.schema.dropTableIfExists('mail_queue');
  await knex.schema.dropTableIfExists('notification_preferences');
  await knex.raw('DROP TRIGGER IF EXISTS reviews_no_truncate ON reviews');
  await knex.schema.dropTableIfExists('reviews');
  await knex.raw('DROP FUNCTION IF EXISTS reviews_refuse_change()');
  await knex.raw('DROP TRIGGER IF EXISTS reduced_versions_guard ON reduced_versions');
  await knex.raw('DROP FUNCTION IF EXISTS reduced_versions_guard()');
  await knex.raw('DROP INDEX IF EXISTS reduced_versions_predecessor_index');
  await knex.raw('DROP INDEX IF EXISTS reduced_versions_status_index');
  for (const c of ['id_author_unique', 'retirement_check', 'four_eyes_check', 'approval_check', 'submission_check']) {
    await knex.raw(`ALTER TABLE reduced_versions DROP CONSTRAINT IF EXISTS reduced_versions_${c}`);
  }
  await knex.schema.alterTable('reduced_versions', (t) => {
    t.dropColumns('submitted_at', 'approved_by', 'approved_at', 'approved_figures', 'retired_by', 'retired_at', 'retired_reason');
  });
}
