// Frequency-limited balanced truncation (Gawronski & Juang 1990; issue 15) becomes a recipe method. Its band
// lives in recipes.options like the modal band rule's: { band: { minFrequency, maxFrequency } } in rad per
// model time unit, as the engine used it, and { enteredBand: { minFrequency, maxFrequency, unit } } as the
// person gave it ('rad' or 'hz'). The database holds the shape itself: a frequency-limited recipe is chosen
// by order (it has no a-priori bound for a tolerance to meet) and carries a band with 0 ≤ min < max.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_method_check');
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_method_check
    CHECK (method IN ('balanced', 'residualization', 'modal', 'frequency-limited'))`);
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_frequency_limited_check CHECK (
    method <> 'frequency-limited' OR (
      "order" IS NOT NULL
      AND jsonb_typeof(options->'band'->'minFrequency') = 'number'
      AND jsonb_typeof(options->'band'->'maxFrequency') = 'number'
      AND (options->'band'->>'minFrequency')::float8 >= 0
      AND (options->'band'->>'maxFrequency')::float8 > (options->'band'->>'minFrequency')::float8))`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_frequency_limited_check');
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_method_check');
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_method_check
    CHECK (method IN ('balanced', 'residualization', 'modal'))`);
}
