// For a reduced model's page: every version still in use whose source model has moved on, each with its
// re-run (or the version that re-ran it). Renders nothing when nothing is upstream-changed.
import { currentUser } from '@/lib/auth';
import { upstreamChangedVersions } from '@/lib/upstream';
import { UpstreamNotice } from './UpstreamNotice';

export async function ReducedModelUpstreamNotice({ reducedModelId }: { reducedModelId: string }) {
  const [viewer, changes] = await Promise.all([currentUser(), upstreamChangedVersions({ reducedModelId })]);
  if (!viewer || changes.length === 0) return null;
  return (
    <section aria-label="Upstream changed" className="mb-6 space-y-2">
      {changes.map((c) => (
        <UpstreamNotice
          key={c.reducedVersionId}
          versionId={c.reducedVersionId}
          label={`v${c.number} (${c.status.replace('_', ' ')})`}
          sourceModelName={c.sourceModelName}
          sourceNumber={c.sourceNumber}
          newestSourceNumber={c.newestSourceNumber}
          rerun={c.rerun}
          viewerRole={viewer.role}
        />
      ))}
    </section>
  );
}
