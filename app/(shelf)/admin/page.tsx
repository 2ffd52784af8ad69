import { redirect } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';

export default async function AdminPage() {
  await requirePageRole('admin');
  redirect('/admin/people');
}
