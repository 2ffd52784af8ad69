import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { getPreferences, KIND_ROLES, NOTIFICATION_KINDS } from '@/lib/notifications';
import { ROLE_DUTIES, ROLE_LABELS } from '@/lib/roles';
import { PageHeader } from '@/components/shell/PageHeader';
import { PreferencesForm } from './PreferencesForm';

export const metadata: Metadata = { title: 'Profile' };

export default async function ProfilePage() {
  const user = await requirePageRole();
  const preferences = await getPreferences(user.id);
  const offered = NOTIFICATION_KINDS.filter((kind) => KIND_ROLES[kind].includes(user.role));
  return (
    <>
      <PageHeader title="Profile" lead={`${user.name} (${user.email}), ${ROLE_LABELS[user.role].toLowerCase()}: ${ROLE_DUTIES[user.role]}.`} />
      <PreferencesForm initial={preferences} offered={offered} />
    </>
  );
}
