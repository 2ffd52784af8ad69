import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';

export const metadata: Metadata = { title: 'Reviews' };

export default async function ReviewsPage() {
  const user = await requirePageRole();
  return (
    <>
      <PageHeader
        title="Reviews"
        lead="Reduced model versions submitted for review, and the decisions taken on them."
      />
      <EmptyState
        title="No reviews yet"
        willAppear={
          user.role === 'reviewer'
            ? 'Versions waiting for your decision will be listed here. You will approve them, or send them back for revision with a comment; you never review your own work.'
            : 'Versions in review and their decisions (approved, or sent back for revision with the reviewer\u2019s comment) will be listed here.'
        }
        meanwhile={[
          'An engineer submits a draft version for review; a reviewer who did not author it approves it or returns it for revision.',
        ]}
      />
    </>
  );
}
