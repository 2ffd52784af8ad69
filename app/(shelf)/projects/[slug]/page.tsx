import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { appUrl } from '@/lib/config';
import { findProjectBySlug, listMembers, projectAccess, toProject } from '@/lib/projects';
import { listProjectPins, pinCandidates } from '@/lib/pins';
import { listProjectTokens } from '@/lib/project-tokens';
import { PageHeader } from '@/components/shell/PageHeader';
import { Caution } from '@/components/workspace/Caution';
import { formatFrequency, formatNumber, formatTime } from '@/lib/format';
import { PinsPanel } from '@/components/projects/PinsPanel';
import { TokensPanel } from '@/components/projects/TokensPanel';
import { MembersPanel, SampleTimeForm } from '@/components/projects/MembersPanel';
import { AcceptanceBandForm } from '@/components/projects/AcceptanceBandForm';
import { pinnedSourcesOfProject } from '@/lib/reduced-models';
import { PullApiHelp } from '@/components/projects/PullApiHelp';

export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ slug: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const row = await findProjectBySlug((await params).slug).catch(() => undefined);
  return { title: row ? `${row.name} · Controller projects` : 'Controller projects' };
}

export default async function ControllerProjectPage({ params }: Props) {
  const user = await requirePageRole();
  const { slug } = await params;
  const row = await findProjectBySlug(slug);
  if (!row) notFound();
  const project = toProject(row);
  const [access, pins, members] = await Promise.all([projectAccess(row.id, user), listProjectPins(row.id), listMembers(row.id)]);
  const tokens = access.isMember ? await listProjectTokens(row, user) : null;
  const candidates = access.canManage ? await pinCandidates() : [];
  const sources = project.acceptanceBand ? await pinnedSourcesOfProject(row.id) : [];

  return (
    <>
      <p className="mb-1 text-xs">
        <Link href="/projects">Controller projects</Link> ›
      </p>
      <PageHeader
        title={project.name}
        lead={
          <>
            <span className="num">{project.slug}</span> · sample time{' '}
            <span className="num">{project.sampleTime === null ? 'not set' : formatTime(project.sampleTime, 's')}</span> · acceptance band{' '}
            <span className="num" data-testid="project-acceptance-band">
              {project.acceptanceBand
                ? `${formatFrequency(project.acceptanceBand.minFrequency)} to ${formatFrequency(project.acceptanceBand.maxFrequency)}${
                    project.acceptanceBand.maxError !== null ? `, error at most ${formatNumber(project.acceptanceBand.maxError)}` : ''
                  }`
                : 'not set'}
            </span>
            {project.description ? ` · ${project.description}` : ''}
          </>
        }
      />
      <div className="space-y-6">
        <Caution />
        {project.acceptanceBand && sources.length > 0 ? (
          <section aria-label="Reduce for this band" className="panel px-4 py-3 text-sm">
            <h2 className="mb-1 text-base font-semibold">Reduce for this band</h2>
            <p className="mb-1">Frequency-limited balanced truncation on the project&apos;s acceptance band, from the newest version of a pinned model&apos;s source:</p>
            <ul className="list-disc pl-5">
              {sources.map((s) => (
                <li key={s.slug}>
                  <Link href={`/source-models/${s.slug}/versions/${s.versionNumber}?project=${project.slug}`}>
                    {s.name} v{s.versionNumber}
                  </Link>
                </li>
              ))}
            </ul>
          </section>
        ) : null}
        <PinsPanel projectSlug={project.slug} pins={pins} candidates={candidates} canManage={access.canManage} sampleTime={project.sampleTime} />
        {tokens ? (
          <TokensPanel projectSlug={project.slug} initialTokens={tokens} canManage={access.canManage} />
        ) : (
          <p className="text-sm text-graphite-soft">Project tokens are shown to the project's members.</p>
        )}
        <MembersPanel projectSlug={project.slug} members={members} canManage={access.canManage} />
        {access.canManage ? (
          <section aria-label="Settings" className="panel px-4 py-3">
            <h2 className="mb-2 text-base font-semibold">Settings</h2>
            <SampleTimeForm projectSlug={project.slug} sampleTime={project.sampleTime} />
            <AcceptanceBandForm projectSlug={project.slug} band={project.acceptanceBand} />
          </section>
        ) : null}
        <PullApiHelp projectSlug={project.slug} origin={appUrl()} firstModel={pins[0]?.reducedModel.slug ?? null} />
      </div>
    </>
  );
}
