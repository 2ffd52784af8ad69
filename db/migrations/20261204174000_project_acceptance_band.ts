// A controller project's acceptance band (issue 15): the frequencies its controller needs the reduced model
// to be accurate over, in rad/s, and optionally the largest error it accepts there. The reduce page starts
// frequency-limited balanced truncation's band (and the recipe's acceptance check) from it when a person
// comes from the project. All three are null for a project without a band; the database keeps the shape:
// 0 ≤ min < max, finite, and a positive finite largest error when one is given.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('controller_projects', (t) => {
    t.double('acceptance_min_frequency');
    t.double('acceptance_max_frequency');
    t.double('acceptance_max_error');
  });
  await knex.raw(`ALTER TABLE controller_projects ADD CONSTRAINT controller_projects_acceptance_band_check CHECK (
    (acceptance_min_frequency IS NULL AND acceptance_max_frequency IS NULL AND acceptance_max_error IS NULL)
    OR (acceptance_min_frequency IS NOT NULL AND acceptance_max_frequency IS NOT NULL
        AND acceptance_min_frequency >= 0
        AND acceptance_max_frequency > acceptance_min_frequency
        AND acceptance_max_frequency < 'Infinity'::float8
        AND (acceptance_max_error IS NULL OR (acceptance_max_error > 0 AND acceptance_max_error < 'Infinity'::float8))))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE controller_projects DROP CONSTRAINT controller_projects_acceptance_band_check');
  await knex.schema.alterTable('controller_projects', (t) => {
    t.dropColumn('acceptance_min_frequency');
    t.dropColumn('acceptance_max_frequency');
    t.dropColumn('acceptance_max_error');
  });
}
