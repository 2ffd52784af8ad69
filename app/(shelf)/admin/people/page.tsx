import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { listPeople } from '@/lib/people';
import { PageHeader } from '@/components/shell/PageHeader';
import { PeopleTable } from '@/components/admin/PeopleTable';

export const metadata: Metadata = { title: 'Admin › People' };

export default async function PeoplePage() {
  const admin = await requirePageRole('admin');
  const people = await listPeople();
  return (
    <>
      <PageHeader
        title="Admin › People"
        lead="Everyone who can sign in, their role, and whether their account is active. Invite new people by e-mail; they choose their own password from the link."
      />
      <PeopleTable initialPeople={people} currentUserId={admin.id} />
    </>
  );
}
