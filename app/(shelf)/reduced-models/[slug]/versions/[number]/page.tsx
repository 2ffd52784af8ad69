import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { getComparisonPage } from '@/lib/reduced-models';
import type { VersionStatus } from '@/lib/review/state-machine';
import { PageHeader } from '@/components/shell/PageHeader';
import { StatusBadge } from '@/components/review/StatusBadge';
import { Caution } from '@/components/workspace/Caution';
import { ComparisonView } from '@/components/reduced-models/ComparisonView';
import { VersionReviewSection } from '@/components/review/VersionReviewSection';
import { describeRecipe } from '@/lib/recipe-words';

export const metadata: Metadata = { title: 'Full and reduced compared' };
export const dynamic = 'force-dynamic';

export default async function ComparisonPage({ params }: { params: Promise<{ slug: string; number: string }> }) {
  const user = await requirePageRole();
  const { slug, number } = await params;
  const n = Number(number);
  if (!Number.isInteger(n) || n < 1) notFound();
  const data = await getComparisonPage(slug, n);
  if (!data) notFound();
  const { model, version, recipe, source, figures, curves } = data;
  const timeBase = source.timeBase || 's';
  return (
    <>
      <PageHeader
        title={`${model.name} v${version.number}: full and reduced compared`}
        lead={
          <>
            <span className="num">{version.order}</span> states from{' '}
            <Link href={source.url}>
              {source.modelName} v{source.versionNumber}
            </Link>{' '}
            (<span className="num">{figures.fullOrder}</span> states) by {describeRecipe(recipe, { timeBase, resultOrder: version.order })}.
          </>
        }
        actions={
          <>
            <Link className="button-quiet" href={`/reviews/${version.id}`}>
              Review sheet
            </Link>
            <Link className="button-quiet" href={`/reduced-models/${model.slug}`}>
              All versions
            </Link>
          </>
        }
      />
      <Caution className="mb-4" />
      <div className="mb-6 flex flex-wrap items-center gap-3 text-sm">
        <StatusBadge status={version.status as VersionStatus} />
        <span className="num text-xs text-graphite-soft" title="SHA-256 of the canonical matrices JSON">
          matrices SHA-256 {version.matricesSha256}
        </span>
        <span className="num text-xs text-graphite-soft">{version.engineVersion}</span>
      </div>
      <ComparisonView
        reducedVersionId={version.id}
        figures={figures}
        curves={curves}
        acceptance={version.acceptance}
        timeBase={timeBase}
        inputLabels={source.inputLabels}
        outputLabels={source.outputLabels}
        responseJob={data.responseJob}
        canUploadSignal={user.role === 'engineer' || user.role === 'reviewer'}
      />
      <VersionReviewSection versionId={version.id} />
    </>
  );
}
