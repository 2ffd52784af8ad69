import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageRole } from '@/lib/auth';
import { ROLE_DUTIES, ROLE_LABELS } from '@/lib/roles';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';

export const metadata: Metadata = { title: 'Dashboard' };

export default async function DashboardPage() {
  const user = await requirePageRole();
  return (
    <>
      <PageHeader
        title="Dashboard"
        lead={
          <>
            Signed in as {user.name}, {ROLE_LABELS[user.role].toLowerCase()}: {ROLE_DUTIES[user.role]}.
          </>
        }
      />
      <EmptyState
        title="Nothing on the shelf yet"
        willAppear="This page will list what needs you: reduced models waiting for your review, drafts sent back for revision, reduced models whose source model has a newer version (upstream changed), and the latest reductions and uploads."
        meanwhile={[
          <>
            Read what each section will hold: <Link href="/source-models">Source models</Link>,{' '}
            <Link href="/reduced-models">Reduced models</Link>, <Link href="/reviews">Reviews</Link> and{' '}
            <Link href="/projects">Controller projects</Link>.
          </>,
          user.role === 'admin' ? (
            <>
              Invite your team on <Link href="/admin/people">Admin › People</Link>; their invitations appear on{' '}
              <Link href="/admin/mail">Admin › Mail</Link>.
            </>
          ) : (
            'Ask your admin to give you the role your work needs: engineers upload and reduce, reviewers approve.'
          ),
        ]}
      />
    </>
  );
}
