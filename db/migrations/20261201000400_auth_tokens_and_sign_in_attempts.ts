// Single-use, expiring links for invitations and password resets, and the record of sign-in attempts
// that rate limiting counts. Only the SHA-256 of a token is stored: a copy of the database does not
// hand out working links.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('auth_tokens', (t) => {
    t.bigIncrements('id').primary();
    t.uuid('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.text('purpose').notNullable();
    t.text('token_hash').notNullable().unique();
    t.timestamp('expires_at', { useTz: true }).notNullable();
    t.timestamp('used_at', { useTz: true });
    t.uuid('created_by').references('id').inTable('users');
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(['user_id', 'purpose']);
  });
  await knex.raw(`ALTER TABLE auth_tokens ADD CONSTRAINT auth_tokens_purpose_check
    CHECK (purpose IN ('invite', 'reset'))`);

  await knex.schema.createTable('sign_in_attempts', (t) => {
    t.bigIncrements('id').primary();
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('email').notNullable(); // as typed, lower-cased; may name no account
    t.text('address').notNullable(); // client IP address, or 'unknown'
    t.boolean('succeeded').notNullable();
    t.index(['email', 'at']);
    t.index(['address', 'at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sign_in_attempts');
  await knex.schema.dropTable('auth_tokens');
}
