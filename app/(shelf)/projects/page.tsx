import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';

export const metadata: Metadata = { title: 'Controller projects' };

export default async function ControllerProjectsPage() {
  await requirePageRole();
  return (
    <>
      <PageHeader
        title="Controller projects"
        lead="Controller, observer and MPC projects that pull approved reduced models from the shelf."
      />
      <EmptyState
        title="No controller projects yet"
        willAppear="Each project will list its pins (an exact reduced model version, or the newest approved one within limits), its project tokens for the pull API, and a warning when a pinned model's source has changed upstream. Its modeshelf.lock.json records the checksum of every pulled model."
        meanwhile={[
          'Pins can only point at approved reduced model versions, so the first project becomes useful once a review has approved one.',
        ]}
      />
    </>
  );
}
