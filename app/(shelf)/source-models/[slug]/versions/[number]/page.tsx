import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { getVersionPage } from '@/lib/source-models';
import { projectBandSeed, reducedModelsOfSource, timeBaseSeconds } from '@/lib/reduced-models';
import { PageHeader } from '@/components/shell/PageHeader';
import { AnalysisFigures } from '@/components/source-models/AnalysisFigures';
import { JobProgress } from '@/components/source-models/JobProgress';
import { mayCancel } from '@/lib/jobs/jobs';
import { VersionWorkspace } from '@/components/source-models/VersionWorkspace';

export const metadata: Metadata = { title: 'Source version' };
export const dynamic = 'force-dynamic';

export default async function SourceVersionPage({
  params,
  searchParams,
}: {
  params: Promise<{ slug: string; number: string }>;
  searchParams: Promise<{ project?: string | string[] }>;
}) {
  const user = await requirePageRole();
  const { slug, number } = await params;
  const n = Number(number);
  if (!Number.isInteger(n) || n < 1) notFound();
  const data = await getVersionPage(slug, n);
  if (!data) notFound();
  const { model, version, analysis } = data;
  const timeBase = model.timeBase || 's';
  const reducedModels = analysis ? await reducedModelsOfSource(model.id) : [];
  // ?project=slug: a person arriving from a controller project starts from its acceptance band.
  const project = (await searchParams).project;
  const seed = analysis ? await projectBandSeed(typeof project === 'string' ? project : undefined, timeBase) : null;
  return (
    <>
      <PageHeader
        title={`${model.name} v${version.number}`}
        lead={
          <>
            <span className="num">
              {version.states} states, {version.inputs} inputs, {version.outputs} outputs
            </span>{' '}
            · {version.format} · uploaded by {version.uploadedBy.name} on <span className="num">{version.createdAt.slice(0, 10)}</span>
            {data.latestNumber > version.number ? (
              <>
                {' '}
                · a newer version exists: <Link href={`/source-models/${model.slug}/versions/${data.latestNumber}`}>v{data.latestNumber}</Link>
              </>
            ) : null}
          </>
        }
        actions={
          <Link className="button-quiet" href={`/source-models/${model.slug}`}>
            All versions
          </Link>
        }
      />
      <p className="num mb-4 text-xs text-graphite-soft" title="SHA-256 of the uploaded files">
        checksum {version.checksum} · files {version.files.map((f) => f.name).join(', ')}
        {version.notes ? ` · ${version.notes}` : ''}
      </p>
      {analysis ? (
        <div className="space-y-6">
          <AnalysisFigures analysis={analysis} timeBase={timeBase} />
          <VersionWorkspace
            analysis={analysis}
            sourceVersionId={version.id}
            sourceName={model.name}
            versionNumber={version.number}
            timeBase={timeBase}
            canRun={user.role === 'engineer'}
            reducedModels={reducedModels}
            timeBaseSeconds={timeBaseSeconds(timeBase)}
            seed={seed}
          />
        </div>
      ) : version.job ? (
        <JobProgress
          initial={version.job}
          label={`Analysis of v${version.number}`}
          canRetry={user.role === 'engineer'}
          canCancel={mayCancel(user, version.job)}
        />
      ) : (
        <p className="panel p-4 text-sm">This version has no analysis and no analysis job.</p>
      )}
    </>
  );
}
