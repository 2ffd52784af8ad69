// Exports of a reduced-model version: JSON, CSV bundle (zip) or C header, continuous or discretised at a
// sample time. Used by the pull API (app/api/v1/, project token) and by the project page's downloads
// (app/api/projects/, signed-in session); both answer through exportResponse so the headers agree.
import { z } from 'zod';
import { loadExportSource } from './source';
import { discretise, parseSampleTime } from './discrete';
import { buildExportDocument, exportJson, exportStem, type ExportDocument, type PinContext } from './document';
import { csvBundle } from './csv-bundle';
import { cHeader } from './c-header';

export const EXPORT_FORMATS = ['json', 'csv', 'c'] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

export const exportQuerySchema = z
  .object({
    format: z.enum(EXPORT_FORMATS, { error: 'format must be json, csv (a zip of CSV files) or c (a C header).' }).default('json'),
    ts: z.string().optional(),
  })
  .strict();

export interface RenderedExport {
  body: string | Buffer;
  contentType: string;
  fileName: string;
}

export async function render(doc: ExportDocument, format: ExportFormat): Promise<RenderedExport> {
  const stem = exportStem(doc);
  switch (format) {
    case 'json':
      return { body: JSON.stringify(exportJson(doc), null, 2) + '\n', contentType: 'application/json; charset=utf-8', fileName: `${stem}.json` };
    case 'csv':
      return { body: await csvBundle(doc), contentType: 'application/zip', fileName: `${stem}-csv.zip` };
    case 'c':
      return { body: cHeader(doc), contentType: 'text/x-c; charset=us-ascii', fileName: `${stem.replace(/[^A-Za-z0-9]+/g, '_')}.h` };
  }
}

export interface ExportRequest {
  versionId: string;
  format: ExportFormat;
  /** The raw `ts` query value: seconds, or "project". */
  ts?: string;
  projectSampleTime: number | null;
  pin?: PinContext | null;
  now?: Date;
}

export async function exportVersion(request: ExportRequest): Promise<{ doc: ExportDocument; rendered: RenderedExport }> {
  const sample = parseSampleTime(request.ts, request.projectSampleTime);
  const source = await loadExportSource(request.versionId);
  const discretisation = sample ? discretise(source, sample.ts, sample.source) : null;
  const doc = buildExportDocument(source, { discretisation, pin: request.pin ?? null, now: request.now });
  return { doc, rendered: await render(doc, request.format) };
}

export function exportResponse({ doc, rendered }: { doc: ExportDocument; rendered: RenderedExport }): Response {
  const headers = new Headers({
    'content-type': rendered.contentType,
    'content-disposition': `attachment; filename="${rendered.fileName}"`,
    'cache-control': 'no-store',
    'x-modeshelf-model': doc.source.reducedModel.slug,
    'x-modeshelf-version': String(doc.source.version.number),
    'x-modeshelf-matrices-sha256': doc.matricesSha256,
    'x-modeshelf-registered-sha256': doc.registeredMatricesSha256,
  });
  const flags = [doc.flags.retired ? 'retired' : null, doc.flags.upstreamChanged ? 'upstream-changed' : null, doc.discretisation?.check.warning ? 'sample-time' : null].filter(Boolean);
  if (flags.length > 0) headers.set('x-modeshelf-warnings', flags.join(', '));
  const body = typeof rendered.body === 'string' ? rendered.body : new Uint8Array(rendered.body);
  return new Response(body, { status: 200, headers });
}

export type { ExportDocument, PinContext } from './document';
