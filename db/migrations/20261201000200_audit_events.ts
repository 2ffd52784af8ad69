// Append-only record of who did what, when, to what. The trigger makes "append-only" a property of the
// database rather than a promise of the application: UPDATE, DELETE and TRUNCATE are refused for every
// role, including the table owner.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary();
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now());
    // Null for actions with no signed-in actor (a visitor redeeming an invitation, the system itself).
    t.uuid('actor_id').references('id').inTable('users').onDelete('RESTRICT');
    t.text('action').notNullable(); // dotted verb, e.g. 'user.invited', 'user.role_changed'
    t.text('subject_type').notNullable(); // e.g. 'user', later 'source_version', 'reduced_version'
    t.text('subject_id');
    t.jsonb('details').notNullable().defaultTo('{}');
    t.index(['subject_type', 'subject_id']);
    t.index(['at']);
  });
  await knex.raw(`
    CREATE FUNCTION audit_events_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only: % refused', TG_OP
        USING ERRCODE = 'insufficient_privilege';
    END
    $$`);
  await knex.raw(`CREATE TRIGGER audit_events_no_update_delete BEFORE UPDATE OR DELETE ON audit_events
    FOR EACH ROW EXECUTE FUNCTION audit_events_refuse_change()`);
  await knex.raw(`CREATE TRIGGER audit_events_no_truncate BEFORE TRUNCATE ON audit_events
    FOR EACH STATEMENT EXECUTE FUNCTION audit_events_refuse_change()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_events');
  await knex.raw('DROP FUNCTION IF EXISTS audit_events_refuse_change()');
}
