import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { reviewSheet, versionIdSchema } from '@/lib/review';
import { accuracySideBySide } from '@/lib/lineage';
import { reducedVersionPath } from '@/lib/reduced-models';
import { versionPath } from '@/lib/source-models';
import { PageHeader } from '@/components/shell/PageHeader';
import { Caution } from '@/components/workspace/Caution';
import { ReviewPanel } from '@/components/review/ReviewPanel';
import { FigureComparison } from '@/components/review/FigureComparison';
import { StatusBadge, UpstreamChangedBadge } from '@/components/review/StatusBadge';
import { UpstreamNotice } from '@/components/lineage/UpstreamNotice';
import { formatWhen } from '@/components/review/when';
import { describeRecipe } from '@/lib/recipe-words';

export const metadata: Metadata = { title: 'Review sheet' };

export default async function ReviewSheetPage({ params }: { params: Promise<{ versionId: string }> }) {
  const user = await requirePageRole();
  const parsed = versionIdSchema.safeParse({ id: (await params).versionId });
  if (!parsed.success) notFound();
  const sheet = await reviewSheet(parsed.data.id, user);
  if (!sheet) notFound();
  const v = sheet.version;
  const pair = v.predecessor ? await accuracySideBySide(v.predecessor.id, v.id) : null;
  const rerun = sheet.successors.find((s) => s.sourceNumber === v.newestSourceNumber);

  return (
    <>
      <PageHeader
        title={`${v.reducedModel.name} v${v.number}`}
        lead={
          <>
            Review sheet: what this version is, where it came from, its accuracy, and its review. Compare its responses with the full model on the{' '}
            <Link href={reducedVersionPath(v.reducedModel.slug, v.number)}>comparison page</Link>.
          </>
        }
        actions={
          <>
            <Link className="button-quiet" href={reducedVersionPath(v.reducedModel.slug, v.number)}>
              Comparison page
            </Link>
            <Link className="button-quiet" href={`/lineage/reduced-models/${v.reducedModel.slug}`}>
              Lineage
            </Link>
          </>
        }
      />
      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_26rem]">
        <div className="space-y-6">
          <Caution />
          <section aria-label="Version" className="panel px-4 py-3 text-sm">
            <div className="flex flex-wrap items-center gap-2">
              <StatusBadge status={v.status} />
              {v.upstreamChanged ? <UpstreamChangedBadge sourceNumber={v.source.number} newestSourceNumber={v.newestSourceNumber} /> : null}
            </div>
            <dl className="mt-3 grid grid-cols-[10rem_1fr] gap-x-3 gap-y-1">
              <dt className="field-label">Source</dt>
              <dd>
                <Link href={versionPath(v.source.modelSlug, v.source.number)}>
                  {v.source.modelName} v{v.source.number}
                </Link>{' '}
                <span className="num text-xs text-graphite-soft">checksum {v.source.checksum.slice(0, 16)}</span>
              </dd>
              <dt className="field-label">Recipe</dt>
              <dd>{describeRecipe(v.recipe, { timeBase: v.source.timeBase, resultOrder: v.order })}</dd>
              <dt className="field-label">Order</dt>
              <dd className="num">
                {v.order}
                {v.statesKeptUnstable > 0 ? ` (${v.statesKeptUnstable} unstable or marginal states kept exactly)` : ''}
              </dd>
              <dt className="field-label">Engine</dt>
              <dd className="num">{v.engineVersion}</dd>
              <dt className="field-label">Matrices SHA-256</dt>
              <dd className="num break-all text-xs" data-testid="matrices-sha256">
                {v.matricesSha256}
              </dd>
              <dt className="field-label">Author</dt>
              <dd>
                {v.author.name}, registered {formatWhen(v.createdAt)}
                {v.submittedAt ? `, submitted ${formatWhen(v.submittedAt)}` : ''}
              </dd>
              {v.predecessor ? (
                <>
                  <dt className="field-label">Made from</dt>
                  <dd>
                    <Link href={`/reviews/${v.predecessor.id}`}>v{v.predecessor.number}</Link> (source v{v.predecessor.sourceNumber})
                  </dd>
                </>
              ) : null}
              {v.approval ? (
                <>
                  <dt className="field-label">Approved</dt>
                  <dd>
                    by {v.approval.by.name}, {formatWhen(v.approval.at)}
                  </dd>
                </>
              ) : null}
              {v.retirement ? (
                <>
                  <dt className="field-label">Retired</dt>
                  <dd>
                    by {v.retirement.by.name}, {formatWhen(v.retirement.at)}: {v.retirement.reason}
                  </dd>
                </>
              ) : null}
            </dl>
            {v.upstreamChanged ? (
              <div className="mt-3">
                <UpstreamNotice
                  versionId={v.id}
                  label="this version"
                  sourceModelName={v.source.modelName}
                  sourceNumber={v.source.number}
                  newestSourceNumber={v.newestSourceNumber}
                  rerun={rerun ?? null}
                  viewerRole={user.role}
                />
              </div>
            ) : null}
          </section>

          <section aria-label="Accuracy" className="panel px-4 py-3">
            {v.approval ? (
              <FigureComparison
                caption="Accuracy: as approved, and the report now"
                columns={[`At approval (${formatWhen(v.approval.at)})`, 'Report now']}
                sets={[v.approval.figures.figures, v.accuracy?.figures]}
                acceptance={[v.approval.figures.acceptancePassed, v.accuracy?.acceptancePassed]}
                testId="approval-snapshot"
              />
            ) : (
              <FigureComparison
                caption="Accuracy report"
                columns={['This version']}
                sets={[v.accuracy?.figures]}
                acceptance={[v.accuracy?.acceptancePassed]}
                testId="accuracy-figures"
              />
            )}
          </section>

          {pair ? (
            <section aria-label="Old against new" className="panel px-4 py-3">
              <FigureComparison
                caption={`Old against new: v${pair.old.number} (source v${pair.old.source.number}) and this version (source v${pair.new.source.number})`}
                columns={[`v${pair.old.number}, source v${pair.old.source.number}`, `v${pair.new.number}, source v${pair.new.source.number}`]}
                sets={[pair.old.accuracy?.figures, pair.new.accuracy?.figures]}
                acceptance={[pair.old.accuracy?.acceptancePassed, pair.new.accuracy?.acceptancePassed]}
                testId="old-against-new"
              />
            </section>
          ) : null}
        </div>
        <div>
          <ReviewPanel initialSheet={sheet} />
        </div>
      </div>
    </>
  );
}
