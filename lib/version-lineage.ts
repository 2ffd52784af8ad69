// The version lineage read, written once: reduced version → reduced model → source version → source model.
// Every list, sheet, export and notice that names a reduced-model version together with where it came from
// starts here and adds what else it needs (recipe, accuracy report, people, the upstream view) as joins and
// named columns; the rows come back typed, under the names the code uses, never cast field by field.
//
// Aliases in the query: rv (reduced_versions), rm (reduced_models), sv (source_versions), sm (source_models).
import type { Knex } from 'knex';
import type { VersionStatus } from '@/lib/review/state-machine';

/** The columns every lineage read carries. */
export interface LineageRow {
  versionId: string;
  versionNumber: number;
  status: VersionStatus;
  order: number;
  authorId: string;
  createdAt: Date;
  reducedModelId: string;
  reducedModelName: string;
  reducedModelSlug: string;
  sourceVersionId: string;
  sourceVersionNumber: number;
  sourceModelId: string;
  sourceModelName: string;
  sourceModelSlug: string;
}

const LINEAGE_COLUMNS: { readonly [K in keyof LineageRow]: string } = {
  versionId: 'rv.id',
  versionNumber: 'rv.number',
  status: 'rv.status',
  order: 'rv.order',
  authorId: 'rv.author_id',
  createdAt: 'rv.created_at',
  reducedModelId: 'rm.id',
  reducedModelName: 'rm.name',
  reducedModelSlug: 'rm.slug',
  sourceVersionId: 'sv.id',
  sourceVersionNumber: 'sv.number',
  sourceModelId: 'sm.id',
  sourceModelName: 'sm.name',
  sourceModelSlug: 'sm.slug',
};

/** Further columns of a lineage read, by the name they come back under: a column ('r.method') or an expression. */
export type LineageColumns<Extra> = { readonly [K in keyof Extra]: string | Knex.Raw };

/**
 * The tables a read may ask to be joined as well, each under a fixed alias its `extra` columns can name:
 *   recipe    r   the version's recipe (recipes)
 *   author    au  the version's author (users)
 *   upstream  up  the view reduced_version_upstream (newest source version, upstream changed)
 *   report    ar  the accuracy report (accuracy_reports, left join: a version may have none yet)
 */
export type LineageJoin = 'recipe' | 'author' | 'upstream' | 'report';

/**
 * The lineage join with its columns, plus `extra` ones and the `joins` asked for; filter, order and join
 * further on the builder. Awaiting it (or `.first()`) gives `LineageRow & Extra` rows.
 */
export function versionLineage<Extra extends object = Record<never, never>>(
  knex: Knex | Knex.Transaction,
  extra?: LineageColumns<Extra>,
  joins: readonly LineageJoin[] = [],
): Knex.QueryBuilder<Record<string, unknown>, (LineageRow & Extra)[]> {
  const query = knex('reduced_versions as rv')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
    .join('source_models as sm', 'sm.id', 'sv.source_model_id')
    .select({ ...LINEAGE_COLUMNS, ...extra } as Record<string, string>);
  if (joins.includes('recipe')) query.join('recipes as r', 'r.id', 'rv.recipe_id');
  if (joins.includes('author')) query.join('users as au', 'au.id', 'rv.author_id');
  if (joins.includes('upstream')) query.join('reduced_version_upstream as up', 'up.reduced_version_id', 'rv.id');
  if (joins.includes('report')) query.leftJoin('accuracy_reports as ar', 'ar.reduced_version_id', 'rv.id');
  return query as unknown as Knex.QueryBuilder<Record<string, unknown>, (LineageRow & Extra)[]>;
}

/** The newest version number of the source model of `sv` (a column for `extra`). */
export function newestSourceNumber(knex: Knex | Knex.Transaction): Knex.Raw {
  return knex.raw('(SELECT max(s2.number) FROM source_versions s2 WHERE s2.source_model_id = sv.source_model_id)');
}

/** The accuracy report's acceptance record (join 'report'), without the rest of its figures. */
export function reportAcceptance(knex: Knex | Knex.Transaction): Knex.Raw {
  return knex.raw(`ar.figures->'acceptance'`);
}

/**
 * A number from the accuracy report (join 'report') by its key: null when the report states no finite figure
 * there, never zero.
 */
export function reportFigure(knex: Knex | Knex.Transaction, key: 'hInfinityErrorRelative' | 'errorBound'): Knex.Raw {
  return knex.raw(`CASE WHEN jsonb_typeof(ar.figures->'${key}') = 'number' THEN (ar.figures->>'${key}')::float8 END`);
}
