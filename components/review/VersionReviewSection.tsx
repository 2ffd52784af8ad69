// The review of one version where it is compared with its source (the comparison page): upstream change
// with its re-run, and the review panel (actions, history, comments). Reads as the signed-in person.
import { currentUser } from '@/lib/auth';
import { reviewSheet } from '@/lib/review';
import { UpstreamNotice } from '@/components/lineage/UpstreamNotice';
import { ReviewPanel } from './ReviewPanel';

export async function VersionReviewSection({ versionId }: { versionId: string }) {
  const viewer = await currentUser();
  if (!viewer) return null;
  const sheet = await reviewSheet(versionId, viewer);
  if (!sheet) return null;
  const v = sheet.version;
  const rerun = sheet.successors.find((s) => s.sourceNumber === v.newestSourceNumber) ?? null;
  return (
    <section aria-label="Review of this version" className="mt-8 max-w-3xl space-y-4">
      {v.upstreamChanged ? (
        <UpstreamNotice
          versionId={v.id}
          label="this version"
          sourceModelName={v.source.modelName}
          sourceNumber={v.source.number}
          newestSourceNumber={v.newestSourceNumber}
          rerun={rerun}
          viewerRole={viewer.role}
        />
      ) : null}
      <ReviewPanel initialSheet={sheet} />
    </section>
  );
}
