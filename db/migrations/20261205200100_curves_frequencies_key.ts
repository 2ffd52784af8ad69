// Names of our own (issue 16): the comparison curves stored with each accuracy report name their frequency
// grid "frequencies" (rad per time unit of the source model), as the engine's frequency responses and the
// command line's `sweep` do. Reports written before this migration get the key renamed; nothing else changes.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`
    UPDATE accuracy_reports
       SET curves = jsonb_set(curves #- '{frequency,w}', '{frequency,frequencies}', curves #> '{frequency,w}')
     WHERE jsonb_typeof(curves -> 'frequency') = 'object' AND curves #> '{frequency,w}' IS NOT NULL`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`
    UPDATE accuracy_reports
       SET curves = jsonb_set(curves #- '{frequency,frequencies}', '{frequency,w}', curves #> '{frequency,frequencies}')
     WHERE jsonb_typeof(curves -> 'frequency') = 'object' AND curves #> '{frequency,frequencies}' IS NOT NULL`);
}
