// People who sign in. Nobody is ever deleted (audit_events refer to them); an admin deactivates instead.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('CREATE EXTENSION IF NOT EXISTS pgcrypto'); // gen_random_uuid() before PostgreSQL 13
  await knex.schema.createTable('users', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'));
    t.text('email').notNullable();
    t.text('name').notNullable();
    // Null until the person accepts their invitation and chooses a password.
    t.text('password_hash');
    t.text('role').notNullable().defaultTo('viewer');
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('last_signed_in_at', { useTz: true });
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp('updated_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`ALTER TABLE users ADD CONSTRAINT users_role_check
    CHECK (role IN ('viewer', 'engineer', 'reviewer', 'admin'))`);
  await knex.raw(`ALTER TABLE users ADD CONSTRAINT users_email_check CHECK (email = lower(btrim(email)) AND email LIKE '%_@_%')`);
  await knex.raw('CREATE UNIQUE INDEX users_email_unique ON users (email)');
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('users');
}
