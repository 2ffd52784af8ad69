// Source-model and version rows as the database holds them, and the views the pages and routes show.
import type { FileRole, SourceFormat } from '@/lib/engine-tasks/model-files';
import type { JobView } from '@/lib/jobs/jobs';

export interface SourceModelRow {
  id: string;
  name: string;
  slug: string;
  description: string;
  time_base: string;
  tags: string[];
  created_by: string;
  created_at: Date;
}

export interface StoredFileEntry {
  role: FileRole;
  name: string;
  size: number;
  sha256: string;
  storageKey: string;
}

/** What a version's row and its view share, under the same names. */
interface SourceVersionCommon {
  id: string;
  number: number;
  checksum: string;
  format: SourceFormat;
  files: StoredFileEntry[];
  states: number;
  inputs: number;
  outputs: number;
  notes: string;
}

export interface SourceVersionRow extends SourceVersionCommon {
  source_model_id: string;
  nonzeros_a: string | number;
  uploaded_by: string;
  created_at: Date;
}

export interface SourceVersionView extends SourceVersionCommon {
  nonzerosA: number;
  uploadedBy: { id: string; name: string };
  createdAt: string;
  analysed: boolean;
  job: JobView | null;
}

export interface SourceModelView {
  id: string;
  name: string;
  slug: string;
  description: string;
  timeBase: string;
  tags: string[];
  createdAt: string;
}

export function versionPath(slug: string, number: number): string {
  return `/source-models/${slug}/versions/${number}`;
}

export function toModelView(row: SourceModelRow): SourceModelView {
  return {
    id: row.id,
    name: row.name,
    slug: row.slug,
    description: row.description,
    timeBase: row.time_base,
    tags: row.tags,
    createdAt: new Date(row.created_at).toISOString(),
  };
}
