// Lineage: where a reduced-model version came from and what depends on it. Source-model versions →
// reduced-model versions (each records its source version, recipe, engine version and the checksums of
// its input and output) → the controller projects whose pins resolve to them. A version made by re-running
// a recipe on a newer source version, or as the next draft after a revise decision, records its
// predecessor, drawn as an edge between reduced versions.
//
// Also the old-versus-new accuracy comparison of a version and its predecessor.
import { methodOrderLabel } from '@/lib/recipe-words';
import { db } from '@/lib/db';
import { ApiError, notFound } from '@/lib/http';
import type { VersionStatus } from '@/lib/review/state-machine';
import { versionSummaries, type VersionSummary } from '@/lib/review';
import { pinsForReducedModel } from '@/lib/pins';
import { versionLineage } from '@/lib/version-lineage';

export interface SourceVersionNode {
  kind: 'source_version';
  id: string;
  sourceModelName: string;
  sourceModelSlug: string;
  number: number;
  checksum: string;
  states: number;
  isNewest: boolean;
  registeredAt: string;
}

export interface ReducedVersionNode {
  kind: 'reduced_version';
  id: string;
  reducedModelName: string;
  reducedModelSlug: string;
  number: number;
  status: VersionStatus;
  order: number;
  method: string;
  upstreamChanged: boolean;
  sourceNumber: number;
  newestSourceNumber: number;
  matricesSha256: string;
  inputChecksum: string;
  engineVersion: string;
}

export interface ProjectNode {
  kind: 'project';
  id: string;
  name: string;
  slug: string;
}

export type LineageNode = SourceVersionNode | ReducedVersionNode | ProjectNode;

export interface LineageEdge {
  from: string;
  to: string;
  /** reduced_from: source version → reduced version; predecessor: older → newer reduced version; pinned_by: reduced version → project */
  kind: 'reduced_from' | 'predecessor' | 'pinned_by';
  /** e.g. "balanced truncation, r = 12" (lib/recipe-words.ts), "re-run", "exact pin" */
  label: string;
}

export interface Lineage {
  title: string;
  sourceModel: { id: string; name: string; slug: string };
  nodes: LineageNode[];
  edges: LineageEdge[];
}

async function buildLineage(sourceModelId: string, reducedModelId: string | null, title: (sm: { name: string }) => string): Promise<Lineage> {
  const knex = db();
  const sm = await knex('source_models').where({ id: sourceModelId }).first('id', 'name', 'slug');
  if (!sm) throw notFound('That source model');
  const svRows = await knex('source_versions').where({ source_model_id: sourceModelId }).orderBy('number').select('id', 'number', 'checksum', 'states', 'created_at');
  const rvQuery = versionLineage<{
    predecessorId: string | null;
    matricesSha256: string;
    inputChecksum: string;
    engineVersion: string;
    method: string;
    upstreamChanged: boolean;
    newestSourceNumber: number;
  }>(knex, {
    predecessorId: 'rv.predecessor_id',
    matricesSha256: 'rv.matrices_sha256',
    inputChecksum: 'rv.input_checksum',
    engineVersion: 'rv.engine_version',
    method: 'r.method',
    upstreamChanged: 'up.upstream_changed',
    newestSourceNumber: 'up.newest_source_number',
  }, ['recipe', 'upstream'])
    .where('sm.id', sourceModelId)
    .orderBy([{ column: 'rm.name' }, { column: 'rv.number' }]);
  if (reducedModelId) rvQuery.where('rv.reduced_model_id', reducedModelId);
  const rvRows = await rvQuery;

  const newest = svRows.length > 0 ? svRows[svRows.length - 1].number : 0;
  // A reduced model's page shows the source versions its versions came from, plus the newest one (to show
  // what an upstream change points at); the source model's page shows them all.
  const usedSources = new Set(rvRows.map((r) => r.sourceVersionId));
  const shownSources = reducedModelId ? svRows.filter((s) => usedSources.has(s.id) || s.number === newest) : svRows;

  const nodes: LineageNode[] = shownSources.map((s) => ({
    kind: 'source_version',
    id: s.id,
    sourceModelName: sm.name,
    sourceModelSlug: sm.slug,
    number: s.number,
    checksum: s.checksum,
    states: s.states,
    isNewest: s.number === newest,
    registeredAt: (s.created_at as Date).toISOString(),
  }));
  const edges: LineageEdge[] = [];
  const shownIds = new Set(rvRows.map((r) => r.versionId));
  for (const r of rvRows) {
    nodes.push({
      kind: 'reduced_version',
      id: r.versionId,
      reducedModelName: r.reducedModelName,
      reducedModelSlug: r.reducedModelSlug,
      number: r.versionNumber,
      status: r.status,
      order: r.order,
      method: r.method,
      upstreamChanged: r.upstreamChanged,
      sourceNumber: r.sourceVersionNumber,
      newestSourceNumber: r.newestSourceNumber,
      matricesSha256: r.matricesSha256,
      inputChecksum: r.inputChecksum,
      engineVersion: r.engineVersion,
    });
    edges.push({ from: r.sourceVersionId, to: r.versionId, kind: 'reduced_from', label: methodOrderLabel(r.method, r.order) });
    if (r.predecessorId && shownIds.has(r.predecessorId)) {
      edges.push({ from: r.predecessorId, to: r.versionId, kind: 'predecessor', label: 'made from' });
    }
  }

  const modelIds = [...new Set(rvRows.map((r) => r.reducedModelId))];
  const versionByModelNumber = new Map(rvRows.map((r) => [`${r.reducedModelId}:${r.versionNumber}`, r.versionId]));
  const projects = new Map<string, ProjectNode>();
  for (const modelId of modelIds) {
    for (const pin of await pinsForReducedModel(modelId)) {
      if (pin.resolvedVersionNumber === null) continue;
      const versionId = versionByModelNumber.get(`${modelId}:${pin.resolvedVersionNumber}`);
      if (!versionId) continue;
      projects.set(pin.project.id, { kind: 'project', id: pin.project.id, name: pin.project.name, slug: pin.project.slug });
      edges.push({ from: versionId, to: pin.project.id, kind: 'pinned_by', label: pin.mode === 'exact' ? 'exact pin' : 'newest approved' });
    }
  }
  nodes.push(...projects.values());
  return { title: title(sm), sourceModel: { id: sm.id, name: sm.name, slug: sm.slug }, nodes, edges };
}

export async function sourceModelLineage(slug: string): Promise<Lineage | null> {
  const sm = await db()('source_models').where({ slug }).first('id');
  if (!sm) return null;
  return buildLineage(sm.id, null, (s) => `Lineage of ${s.name}`);
}

export async function reducedModelLineage(slug: string): Promise<Lineage | null> {
  const rm = await db()('reduced_models').where({ slug }).first('id', 'name', 'source_model_id');
  if (!rm) return null;
  return buildLineage(rm.source_model_id, rm.id, () => `Lineage of ${rm.name}`);
}

export interface SideBySide {
  old: VersionSummary;
  new: VersionSummary;
}

/** Two versions of one reduced model for the old-versus-new accuracy view (normally a re-run and its predecessor). */
export async function accuracySideBySide(oldVersionId: string, newVersionId: string): Promise<SideBySide> {
  const found = await versionSummaries([oldVersionId, newVersionId]);
  const old = found.find((v) => v.id === oldVersionId);
  const now = found.find((v) => v.id === newVersionId);
  if (!old) throw notFound('The older reduced model version');
  if (!now) throw notFound('The newer reduced model version');
  if (old.reducedModel.id !== now.reducedModel.id) {
    throw new ApiError(400, 'invalid_request', 'Both versions must belong to the same reduced model.', 'new');
  }
  return { old, new: now };
}
