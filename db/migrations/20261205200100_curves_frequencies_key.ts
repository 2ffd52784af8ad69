// Names of our own (issue 16): the comparison curves stored with each accuracy report name their frequency
// grid "frequencies" (rad per time unit of the source model), as the engine's frequency responses and the
// command line's `sweep` do. Reports written before this migration get the key renamed; nothing else changes;
// rows already renamed are left alone, so `up` may run again.
import type { Knex } from 'knex';

/** The grid's old and new key under curves.frequency (exported for the migration's test). */
export const GRID_KEY: [string, string] = ['w', 'frequencies'];

async function move(knex: Knex, from: string, to: string): Promise<void> {
  await knex.raw(`
    UPDATE accuracy_reports
       SET curves = jsonb_set(curves #- '{frequency,${from}}', '{frequency,${to}}', curves #> '{frequency,${from}}')
     WHERE jsonb_typeof(curves -> 'frequency') = 'object' AND curves #> '{frequency,${from}}' IS NOT NULL`);
}

export async function up(knex: Knex): Promise<void> {
  await move(knex, GRID_KEY[0], GRID_KEY[1]);
}

export async function down(knex: Knex): Promise<void> {
  await move(knex, GRID_KEY[1], GRID_KEY[0]);
}
