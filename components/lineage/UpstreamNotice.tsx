import Link from 'next/link';
import type { Role } from '@/lib/roles';
import { RERUN_ROLES } from '@/lib/upstream';
import { RerunButton } from './RerunButton';

/**
 * "Upstream changed" for one reduced version: which source version it came from, which is newest, and
 * either the version already re-run on it or the one-click re-run (engineers) of the same recipe.
 */
export function UpstreamNotice({
  versionId,
  label,
  sourceModelName,
  sourceNumber,
  newestSourceNumber,
  rerun,
  viewerRole,
}: {
  versionId: string;
  /** e.g. "Zone 2 ROM v3" or "This version" */
  label: string;
  sourceModelName: string;
  sourceNumber: number;
  newestSourceNumber: number;
  rerun: { id: string; number: number; status: string } | null;
  viewerRole: Role;
}) {
  return (
    <div className="border-l-2 border-okabe-orange bg-sheet-raised px-3 py-2 text-sm" data-testid="upstream-notice" data-version={versionId}>
      <p>
        <span aria-hidden="true">↑ </span>
        Upstream changed: {label} was reduced from {sourceModelName} v{sourceNumber}; the source model now has v{newestSourceNumber}.
      </p>
      <div className="mt-1.5">
        {rerun ? (
          <p>
            Re-run on source v{newestSourceNumber}: <Link href={`/reviews/${rerun.id}`}>v{rerun.number}</Link> ({rerun.status.replace('_', ' ')}); its review sheet
            shows old against new accuracy.
          </p>
        ) : RERUN_ROLES.includes(viewerRole) ? (
          <RerunButton versionId={versionId} newestSourceNumber={newestSourceNumber} />
        ) : (
          <p className="text-graphite-soft">An engineer can re-run its recipe on the new version.</p>
        )}
      </div>
    </div>
  );
}
