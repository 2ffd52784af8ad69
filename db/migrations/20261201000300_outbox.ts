// Every message the local fake SMTP server receives (scripts/fake-smtp.ts). Nothing leaves the machine;
// admins read the mail on Admin › Mail.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('outbox', (t) => {
    t.bigIncrements('id').primary();
    t.timestamp('received_at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text('envelope_from');
    t.specificType('envelope_to', 'text[]').notNullable();
    t.text('message_id');
    t.text('from_header');
    t.text('to_header');
    t.text('subject').notNullable().defaultTo('');
    t.text('text_body');
    t.text('html_body');
    t.text('raw').notNullable();
    t.index(['received_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('outbox');
}
