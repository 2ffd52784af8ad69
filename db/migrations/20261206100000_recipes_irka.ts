// IRKA (Gugercin, Antoulas & Beattie 2008; issue 14, "reduction by the at-scale methods") becomes a recipe
// method, on the dense path through the engine's reduce entry and on the large-model path through the
// sparse IRKA. It has no a-priori error bound, so the database holds that an IRKA recipe is chosen by order.
import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_method_check');
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_method_check
    CHECK (method IN ('balanced', 'residualization', 'modal', 'frequency-limited', 'irka'))`);
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_irka_order_check CHECK (method <> 'irka' OR "order" IS NOT NULL)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_irka_order_check');
  await knex.raw('ALTER TABLE recipes DROP CONSTRAINT recipes_method_check');
  await knex.raw(`ALTER TABLE recipes ADD CONSTRAINT recipes_method_check
    CHECK (method IN ('balanced', 'residualization', 'modal', 'frequency-limited'))`);
}
