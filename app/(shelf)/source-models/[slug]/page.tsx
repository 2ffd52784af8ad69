import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { findSourceModel, listVersions, versionPath } from '@/lib/source-models';
import { reducedModelsOfSource } from '@/lib/reduced-models';
import { PageHeader } from '@/components/shell/PageHeader';
import { UploadForm } from '@/components/source-models/UploadForm';

export const metadata: Metadata = { title: 'Source model' };
export const dynamic = 'force-dynamic';

function analysisState(v: { analysed: boolean; job: { status: string } | null }): string {
  if (v.analysed) return 'analysed';
  if (!v.job) return 'not analysed';
  return v.job.status === 'failed' ? 'analysis failed' : v.job.status === 'running' ? 'analysing…' : 'waiting for a worker';
}

export default async function SourceModelPage({ params }: { params: Promise<{ slug: string }> }) {
  const user = await requirePageRole();
  const { slug } = await params;
  const model = await findSourceModel(slug);
  if (!model) notFound();
  const versions = await listVersions(model.id);
  const reduced = await reducedModelsOfSource(model.id);
  return (
    <>
      <PageHeader
        title={model.name}
        lead={model.description || 'A source model and its versions.'}
        actions={
          <Link className="button-quiet" href={`/lineage/source-models/${model.slug}`}>
            Lineage
          </Link>
        }
      />
      <section aria-label="Versions" className="panel mb-6">
        <table className="w-full text-left text-sm" data-testid="versions-table">
          <caption className="px-4 pt-3 text-left text-sm font-medium">Versions</caption>
          <thead>
            <tr className="border-b border-rule-strong">
              {['Version', 'States', 'Inputs', 'Outputs', 'Format', 'Checksum', 'Analysis', 'Uploaded by', 'When', 'Notes'].map((h) => (
                <th key={h} scope="col" className="px-4 py-2 font-medium">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {versions.map((v) => (
              <tr key={v.id} className="border-b border-rule last:border-b-0">
                <td className="px-4 py-2">
                  <Link className="num" href={versionPath(model.slug, v.number)}>
                    v{v.number}
                  </Link>
                </td>
                <td className="num px-4 py-2">{v.states}</td>
                <td className="num px-4 py-2">{v.inputs}</td>
                <td className="num px-4 py-2">{v.outputs}</td>
                <td className="px-4 py-2">{v.format}</td>
                <td className="num px-4 py-2 text-xs" title={v.checksum}>
                  {v.checksum.slice(0, 12)}…
                </td>
                <td className="px-4 py-2">{analysisState(v)}</td>
                <td className="px-4 py-2">{v.uploadedBy.name}</td>
                <td className="num px-4 py-2 text-xs">{v.createdAt.replace('T', ' ').slice(0, 16)}</td>
                <td className="px-4 py-2 text-xs">{v.notes}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      {reduced.length > 0 ? (
        <section aria-label="Reduced models" className="mb-6 text-sm">
          <h2 className="mb-1 font-medium">Reduced models made from it</h2>
          <ul className="list-disc pl-5">
            {reduced.map((r) => (
              <li key={r.id}>
                <Link href={`/reduced-models/${r.slug}`}>{r.name}</Link> <span className="num text-graphite-soft">(v{r.latestVersion})</span>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      {user.role === 'engineer' ? (
        <section aria-label="New version">
          <h2 className="mb-2 text-base font-semibold">Upload a new version</h2>
          <UploadForm sourceModelId={model.id} modelName={model.name} />
        </section>
      ) : null}
    </>
  );
}
