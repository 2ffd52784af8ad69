// Controller projects (issue 7): the controllers, observers and MPC designs that pull approved
// reduced models from the shelf. A project has members, pins (its dependencies on reduced models), and
// project tokens for the pull API; every use of a token is recorded.
//
// Invariants the database holds itself:
//   - a project pins a given reduced model at most once, so the pull API can name a pin by the model's slug;
//   - an exact pin names its version and carries no limits; a "newest approved" pin names no version;
//   - a token's stored hash is unique, and only its SHA-256 is stored (the token is shown once);
//   - limits and sample times are positive where given.
//
// Pin notices travel through the mail queue of the review feature (migration 20261202000200_reviews,
// lib/notifications.ts): its kind check gains 'pin_changed'.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('controller_projects', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('name').notNullable();
    t.text('slug').notNullable().unique();
    t.text('description').notNullable().defaultTo('');
    // The controller's sample time in seconds: the default for discretised exports (?ts= overrides it).
    t.double('sample_time');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE controller_projects ADD CONSTRAINT controller_projects_sample_time_check
    CHECK (sample_time IS NULL OR (sample_time > 0 AND sample_time < 'Infinity'::float8))`);
  await knex.raw(`ALTER TABLE controller_projects ADD CONSTRAINT controller_projects_slug_check
    CHECK (slug ~ '^[a-z0-9]+(-[a-z0-9]+)*$')`);

  await knex.schema.createTable('project_members', (t) => {
    t.uuid('project_id').notNullable().references('id').inTable('controller_projects').onDelete('CASCADE');
    t.uuid('user_id').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.uuid('added_by').references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('added_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(['project_id', 'user_id']);
    t.index(['user_id']);
  });

  await knex.schema.createTable('pins', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('controller_projects').onDelete('CASCADE');
    t.uuid('reduced_model_id').notNullable().references('id').inTable('reduced_models').onDelete('RESTRICT');
    t.text('mode').notNullable(); // 'exact' | 'newest_approved'
    t.uuid('reduced_version_id').references('id').inTable('reduced_versions').onDelete('RESTRICT');
    t.integer('max_order');
    t.double('max_relative_hinf_error');
    t.boolean('require_acceptance_passed').notNullable().defaultTo(false);
    // What members were last told about this pin (resolved version, retired, upstream changed, newest
    // approved seen), so lib/project-notices.ts queues each change once.
    t.jsonb('notice_state');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(['project_id', 'reduced_model_id']);
    t.index(['reduced_model_id']);
  });
  await knex.raw(`ALTER TABLE pins ADD CONSTRAINT pins_mode_check CHECK (mode IN ('exact', 'newest_approved'))`);
  await knex.raw(`ALTER TABLE pins ADD CONSTRAINT pins_mode_shape_check CHECK (
    (mode = 'exact' AND reduced_version_id IS NOT NULL AND max_order IS NULL
       AND max_relative_hinf_error IS NULL AND NOT require_acceptance_passed)
    OR (mode = 'newest_approved' AND reduced_version_id IS NULL))`);
  await knex.raw(`ALTER TABLE pins ADD CONSTRAINT pins_limits_check CHECK (
    (max_order IS NULL OR max_order >= 1)
    AND (max_relative_hinf_error IS NULL OR (max_relative_hinf_error > 0 AND max_relative_hinf_error < 'Infinity'::float8)))`);

  await knex.schema.createTable('project_tokens', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.uuid('project_id').notNullable().references('id').inTable('controller_projects').onDelete('CASCADE');
    t.text('name').notNullable();
    t.text('token_hash').notNullable().unique(); // hex SHA-256 of the token; the token itself is never stored
    t.text('token_prefix').notNullable(); // the first characters, so people can tell their tokens apart
    t.text('scope').notNullable();
    t.timestamp('expires_at', { useTz: true });
    t.timestamp('revoked_at', { useTz: true });
    t.uuid('revoked_by').references('id').inTable('users').onDelete('RESTRICT');
    t.uuid('created_by').notNullable().references('id').inTable('users').onDelete('RESTRICT');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['project_id']);
  });
  await knex.raw(`ALTER TABLE project_tokens ADD CONSTRAINT project_tokens_scope_check CHECK (scope IN ('pull', 'lock-check'))`);

  await knex.schema.createTable('token_uses', (t) => {
    t.bigIncrements('id').primary();
    t.uuid('token_id').notNullable().references('id').inTable('project_tokens').onDelete('CASCADE');
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('address').notNullable();
    t.text('method').notNullable();
    t.text('path').notNullable();
    t.index(['token_id', 'at']);
  });

  await knex.raw('ALTER TABLE mail_queue DROP CONSTRAINT mail_queue_kind_check');
  await knex.raw(`ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_kind_check
    CHECK (kind IN ('review_requested', 'review_decided', 'upstream_changed', 'pin_changed'))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex('mail_queue').where({ kind: 'pin_changed' }).delete();
  await knex.raw('ALTER TABLE mail_queue DROP CONSTRAINT mail_queue_kind_check');
  await knex.raw(`ALTER TABLE mail_queue ADD CONSTRAINT mail_queue_kind_check
    CHECK (kind IN ('review_requested', 'review_decided', 'upstream_changed'))`);
  for (const table of ['token_uses', 'project_tokens', 'pins', 'project_members', 'controller_projects']) {
    await knex.schema.dropTableIfExists(table);
  }
}
