import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { getReducedModel, reducedVersionPath } from '@/lib/reduced-models';
import type { VersionStatus } from '@/lib/review/state-machine';
import { PageHeader } from '@/components/shell/PageHeader';
import { StatusBadge } from '@/components/review/StatusBadge';
import { Caution } from '@/components/workspace/Caution';
import { ReducedModelUpstreamNotice } from '@/components/lineage/ReducedModelUpstreamNotice';
import { formatNumber, formatPercent } from '@/lib/format';
import { methodName, NO_BOUND_NOTE } from '@/lib/recipe-words';
import { acceptanceWord } from '@/lib/acceptance';

export const metadata: Metadata = { title: 'Reduced model' };
export const dynamic = 'force-dynamic';

export default async function ReducedModelPage({ params }: { params: Promise<{ slug: string }> }) {
  await requirePageRole();
  const { slug } = await params;
  const found = await getReducedModel(slug);
  if (!found) notFound();
  const { model, versions } = found;
  return (
    <>
      <PageHeader
        title={model.name}
        lead={
          <>
            {model.description ? `${model.description} ` : ''}Reduced from <Link href={`/source-models/${model.sourceModel.slug}`}>{model.sourceModel.name}</Link>.
          </>
        }
        actions={
          <Link className="button-quiet" href={`/lineage/reduced-models/${model.slug}`}>
            Lineage
          </Link>
        }
      />
      <Caution className="mb-6" />
      <ReducedModelUpstreamNotice reducedModelId={model.id} />
      <section aria-label="Versions" className="panel overflow-x-auto">
        <table className="w-full text-left text-sm" data-testid="reduced-versions-table">
          <caption className="px-4 pt-3 text-left text-sm font-medium">Versions</caption>
          <thead>
            <tr className="border-b border-rule-strong">
              {['Version', 'State', 'Source', 'Method', 'Order', 'H∞ error, relative', 'Bound', 'Acceptance', 'Matrices SHA-256', 'Author', 'When', ''].map((h, k) => (
                <th key={k} scope="col" className="px-4 py-2 font-medium">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {versions.map((v) => (
              <tr key={v.id} className="border-b border-rule last:border-b-0">
                <td className="px-4 py-2">
                  <Link className="num" href={reducedVersionPath(model.slug, v.number)}>
                    v{v.number}
                  </Link>
                </td>
                <td className="px-4 py-2">
                  <StatusBadge status={v.status as VersionStatus} />
                </td>
                <td className="px-4 py-2">
                  <Link className="num" href={`/source-models/${model.sourceModel.slug}/versions/${v.sourceVersionNumber}`}>
                    v{v.sourceVersionNumber}
                  </Link>
                </td>
                <td className="px-4 py-2">{methodName(v.method)}</td>
                <td className="num px-4 py-2">{v.order}</td>
                <td className="num px-4 py-2">{v.hInfinityErrorRelative === null ? '—' : formatPercent(v.hInfinityErrorRelative)}</td>
                <td className="num px-4 py-2">
                  {v.errorBound !== null ? (
                    formatNumber(v.errorBound)
                  ) : v.method === 'frequency-limited' ? (
                    <span title={NO_BOUND_NOTE}>none</span>
                  ) : (
                    '—'
                  )}
                </td>
                <td className="px-4 py-2">{acceptanceWord(v.acceptance)}</td>
                <td className="num px-4 py-2 text-xs" title={v.matricesSha256}>
                  {v.matricesSha256.slice(0, 12)}…
                </td>
                <td className="px-4 py-2">{v.author}</td>
                <td className="num px-4 py-2 text-xs">{v.createdAt.replace('T', ' ').slice(0, 16)}</td>
                <td className="px-4 py-2">
                  <Link href={`/reviews/${v.id}`}>Review sheet</Link>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </>
  );
}
