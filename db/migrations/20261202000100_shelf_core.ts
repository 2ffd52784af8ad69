// The shelf's core records: source models and their numbered versions, analyses, recipes,
// reduced models and their numbered versions with accuracy reports, and engine jobs with their progress.
// Later features (review, controller projects) add their own tables and constraints in later migrations.
//
// Invariants the database holds itself, so no code path can break them:
//   - version numbers are unique per model, and a source model holds a given upload checksum once;
//   - a reduced-model version's status is one of the five life states (draft, in_review, approved, revise, retired);
//   - a job's fraction lies in [0, 1] and its status is one of four.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('source_models', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.text('slug').notNullable().unique();
    t.text('description').notNullable().defaultTo('');
    t.text('time_unit').notNullable().defaultTo('s');
    t.specificType('tags', 'text[]').notNullable().defaultTo('{}');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('source_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('source_model_id').notNullable().references('id').inTable('source_models').onDelete('RESTRICT');
    t.integer('number').notNullable();
    // SHA-256 over the uploaded files (one file: its digest; several: digest of "role:digest" lines).
    t.text('checksum').notNullable();
    t.text('format').notNullable(); // 'json' | 'second-order' | 'matrix-market' | 'csv'
    // [{ role: 'model'|'A'|'B'|'C'|'D', name, size, sha256, storageKey }]; storage keys point into uploads/.
    t.jsonb('files').notNullable();
    t.integer('states').notNullable();
    t.integer('inputs').notNullable();
    t.integer('outputs').notNullable();
    t.bigInteger('nonzeros_a').notNullable(); // sparsity of A, shown on the version page
    t.text('notes').notNullable().defaultTo('');
    t.uuid('uploaded_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['source_model_id', 'number']);
    t.unique(['source_model_id', 'checksum']);
  });
  await knex.raw('ALTER TABLE source_versions ADD CONSTRAINT source_versions_number_check CHECK (number >= 1)');
  await knex.raw(`ALTER TABLE source_versions ADD CONSTRAINT source_versions_format_check
    CHECK (format IN ('json', 'second-order', 'matrix-market', 'csv'))`);

  await knex.schema.createTable('analyses', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('source_version_id').notNullable().unique().references('id').inTable('source_versions').onDelete('RESTRICT');
    // Written once, by the job that finishes the analysis, in the same transaction that marks it done.
    t.jsonb('result').notNullable();
    t.text('engine_version').notNullable();
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('recipes', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('method').notNullable(); // 'balanced' | 'residualization' | 'modal'
    t.integer('order'); // exactly one of order / tolerance is set
    t.double('tolerance');
    // modal: { selection: 'dominance'|'slowest'|'band', band?: { minFrequency, maxFrequency } }
    t.jsonb('options').notNullable().defaultTo('{}');
    // Optional acceptance band the controller team needs: { minFrequency, maxFrequency, maxError }.
    t.jsonb('acceptance');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_method_check
    CHECK (method IN ('balanced', 'residualization', 'modal'))`);
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_order_rule_check
    CHECK ((("order" IS NOT NULL AND "order" >= 1)::int + (tolerance IS NOT NULL AND tolerance > 0)::int) = 1)`);

  await knex.schema.createTable('reduced_models', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.text('slug').notNullable().unique();
    t.text('description').notNullable().defaultTo('');
    t.uuid('source_model_id').notNullable().references('id').inTable('source_models').onDelete('RESTRICT');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('reduced_versions', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('reduced_model_id').notNullable().references('id').inTable('reduced_models').onDelete('RESTRICT');
    t.integer('number').notNullable();
    t.uuid('source_version_id').notNullable().references('id').inTable('source_versions').onDelete('RESTRICT');
    t.uuid('recipe_id').notNullable().references('id').inTable('recipes').onDelete('RESTRICT');
    // The version this one re-ran the recipe from (lineage across source versions), if any.
    t.uuid('predecessor_id').references('id').inTable('reduced_versions').onDelete('RESTRICT');
    t.text('status').notNullable().defaultTo('draft');
    t.integer('order').notNullable();
    t.integer('states_kept_unstable').notNullable().defaultTo(0); // unstable/marginal states kept exactly
    // { A, B, C, D } as arrays of rows, plus optional inputNames/outputNames/stateNames/timeUnit.
    t.jsonb('matrices').notNullable();
    t.text('matrices_sha256').notNullable(); // SHA-256 of the canonical matrices JSON (lib/checksums.ts)
    t.text('input_checksum').notNullable(); // the source version's checksum at reduction time
    t.text('engine_version').notNullable();
    t.uuid('author_id').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['reduced_model_id', 'number']);
    t.index(['source_version_id']);
  });
  await knex.raw('ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_number_check CHECK (number >= 1)');
  await knex.raw(`ALTER TABLE reduced_versions ADD CONSTRAINT reduced_versions_status_check
    CHECK (status IN ('draft', 'in_review', 'approved', 'revise', 'retired'))`);

  await knex.schema.createTable('accuracy_reports', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('reduced_version_id').notNullable().unique().references('id').inTable('reduced_versions').onDelete('RESTRICT');
    // Scalar figures: hinfError, hinfErrorRelative, errorBound, h2Error, dcGainError, peakStepError,
    // fullOrder, order, fullStiffnessRatio, reducedStiffnessRatio, acceptancePassed, simulationCost, …
    t.jsonb('figures').notNullable();
    // Curves for the comparison page: frequency grid and responses, step/impulse responses.
    t.jsonb('curves').notNullable();
    t.boolean('acceptance_passed'); // null when the recipe set no acceptance band
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable('jobs', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('kind').notNullable(); // 'analysis' | 'reduction'
    t.text('subject_type').notNullable(); // 'source_version' | 'reduced_model' | …
    t.uuid('subject_id');
    t.text('status').notNullable().defaultTo('queued');
    t.text('stage').notNullable().defaultTo('waiting for a worker');
    t.double('fraction').notNullable().defaultTo(0);
    t.text('error');
    t.integer('attempts').notNullable().defaultTo(0);
    t.jsonb('payload').notNullable().defaultTo('{}');
    t.jsonb('result'); // e.g. { reducedVersionId } for a reduction
    t.text('queue_job_id'); // the queue's own id (pg-boss)
    t.uuid('created_by').references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('started_at', { useTz: true });
    t.timestamp('finished_at', { useTz: true });
    t.index(['subject_type', 'subject_id']);
    t.index(['status']);
  });
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_status_check
    CHECK (status IN ('queued', 'running', 'succeeded', 'failed'))`);
  await knex.raw('ALTER TABLE jobs ADD CONSTRAINT jobs_fraction_check CHECK (fraction >= 0 AND fraction <= 1)');
  await knex.raw(`ALTER TABLE jobs ADD CONSTRAINT jobs_kind_check CHECK (kind IN ('analysis', 'reduction'))`);
}

export async function down(knex: Knex): Promise<void> {
  for (const table of ['jobs', 'accuracy_reports', 'reduced_versions', 'reduced_models', 'recipes', 'analyses', 'source_versions', 'source_models']) {
    await knex.schema.dropTableIfExists(table);
  }
}
