import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { listProjects } from '@/lib/projects';
import { pinsNeedingAttention } from '@/lib/pins';
import { PageHeader } from '@/components/shell/PageHeader';
import { ProjectsTable } from '@/components/projects/ProjectsTable';

export const metadata: Metadata = { title: 'Controller projects' };
export const dynamic = 'force-dynamic';

export default async function ControllerProjectsPage() {
  const user = await requirePageRole();
  const [projects, attention] = await Promise.all([listProjects(user), pinsNeedingAttention()]);
  return (
    <>
      <PageHeader
        title="Controller projects"
        lead="Controller, observer and MPC projects that pull approved reduced models from the shelf. Each pins the reduced models it depends on, exactly or as the newest approved version within limits, and pulls them with its own project tokens."
      />
      <ProjectsTable
        projects={projects.map((p) => ({ ...p, pinsNeedingAttention: attention.get(p.id) ?? 0 }))}
        canCreate={user.role === 'engineer'}
      />
    </>
  );
}
