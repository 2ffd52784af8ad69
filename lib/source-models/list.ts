// The source-model list, sorted, filtered and paginated on the server for the TanStack table.
import { db } from '@/lib/db';
import type { SourceModelListQuery, SourceModelSort } from '@/lib/source-models/schemas';

export interface SourceModelListRow {
  id: string;
  name: string;
  slug: string;
  tags: string[];
  latestVersion: number;
  states: number;
  inputs: number;
  outputs: number;
  stiffnessRatio: number | null;
  stable: boolean | null;
  uploadedBy: string;
  uploadedAt: string;
}

const SORT_SQL: Record<SourceModelSort, string> = {
  name: 'lower(sm.name)',
  latestVersion: 'l.number',
  states: 'l.states',
  inputs: 'l.inputs',
  outputs: 'l.outputs',
  stiffnessRatio: 'stiffness_ratio',
  stable: 'stable',
  uploadedBy: 'lower(l.uploader_name)',
  uploadedAt: 'l.created_at',
};

export async function listSourceModels(query: SourceModelListQuery): Promise<{ rows: SourceModelListRow[]; total: number }> {
  const where: string[] = [];
  const bindings: (string | number)[] = [];
  if (query.q) {
    where.push(`(sm.name ILIKE ? OR sm.description ILIKE ? OR EXISTS (SELECT 1 FROM unnest(sm.tags) t WHERE t ILIKE ?) OR l.uploader_name ILIKE ?)`);
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    bindings.push(like, like, like, like);
  }
  if (query.stable) where.push(query.stable === 'yes' ? `(a.result->>'stable')::boolean IS TRUE` : `(a.result->>'stable')::boolean IS FALSE`);
  const base = `
    FROM source_models sm
    JOIN LATERAL (
      SELECT sv.id, sv.number, sv.states, sv.inputs, sv.outputs, sv.created_at, u.name AS uploader_name
      FROM source_versions sv JOIN users u ON u.id = sv.uploaded_by
      WHERE sv.source_model_id = sm.id ORDER BY sv.number DESC LIMIT 1
    ) l ON TRUE
    LEFT JOIN analyses a ON a.source_version_id = l.id
    ${where.length ? `WHERE ${where.join(' AND ')}` : ''}`;
  const count = await db().raw(`SELECT count(*)::int AS total ${base}`, bindings);
  const total = count.rows[0]?.total ?? 0;
  const order = `${SORT_SQL[query.sort]} ${query.dir === 'asc' ? 'ASC' : 'DESC'} NULLS LAST, lower(sm.name) ASC, sm.id`;
  const result = await db().raw(
    `SELECT sm.id, sm.name, sm.slug, sm.tags, l.number, l.states, l.inputs, l.outputs, l.created_at, l.uploader_name,
            CASE WHEN jsonb_typeof(a.result->'stiffnessRatio') = 'number' THEN (a.result->>'stiffnessRatio')::float8 END AS stiffness_ratio,
            (a.result->>'stable')::boolean AS stable
     ${base} ORDER BY ${order} LIMIT ? OFFSET ?`,
    [...bindings, query.pageSize, query.page * query.pageSize],
  );
  const rows: SourceModelListRow[] = result.rows.map((r: Record<string, unknown>) => ({
    id: r.id as string,
    name: r.name as string,
    slug: r.slug as string,
    tags: r.tags as string[],
    latestVersion: r.number as number,
    states: r.states as number,
    inputs: r.inputs as number,
    outputs: r.outputs as number,
    stiffnessRatio: (r.stiffness_ratio as number | null) ?? null,
    stable: (r.stable as boolean | null) ?? null,
    uploadedBy: r.uploader_name as string,
    uploadedAt: new Date(r.created_at as string).toISOString(),
  }));
  return { rows, total };
}
