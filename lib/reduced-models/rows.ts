// The tables of reduced models as Knex returns their rows: recipes, reduced models and reduced versions, and
// a stored recipe as the engine task's input.
import type { ReducedMatricesRecord } from '@/lib/engine-tasks/records';
import type { RecipeInput } from '@/lib/engine-tasks/reduction-task';
import type { RecipeMethod } from '@/lib/reduced-models/schemas';

export interface ReducedModelRow {
  id: string;
  name: string;
  slug: string;
  description: string;
  source_model_id: string;
  created_by: string;
  created_at: Date;
}

export interface ReducedVersionRow {
  id: string;
  reduced_model_id: string;
  number: number;
  source_version_id: string;
  recipe_id: string;
  predecessor_id: string | null;
  status: string;
  order: number;
  states_kept_unstable: number;
  matrices: ReducedMatricesRecord;
  matrices_sha256: string;
  input_checksum: string;
  engine_version: string;
  author_id: string;
  created_at: Date;
  updated_at: Date;
}

export interface RecipeRow {
  id: string;
  method: RecipeMethod;
  order: number | null;
  tolerance: number | null;
  /**
   * modal: { selection, band? }. frequency-limited: { band } in rad per model time unit (what the engine
   * used) and { enteredBand } as the person gave it (its unit, 'rad' or 'hz'), for display.
   */
  options: {
    selection?: 'dominance' | 'slowest' | 'band';
    band?: { minFrequency: number; maxFrequency: number };
    enteredBand?: { minFrequency: number; maxFrequency: number; unit: 'rad' | 'hz' };
  };
  acceptance: { minFrequency: number; maxFrequency: number; maxError: number } | null;
  created_by: string;
  created_at: Date;
}

export function recipeInputOf(row: RecipeRow): RecipeInput {
  return {
    method: row.method,
    order: row.order,
    tolerance: row.tolerance,
    modal: row.method === 'modal' ? { selection: row.options.selection ?? 'dominance', band: row.options.band } : null,
    limitedBand: row.method === 'frequency-limited' ? (row.options.band ?? null) : null,
    acceptance: row.acceptance,
  };
}
