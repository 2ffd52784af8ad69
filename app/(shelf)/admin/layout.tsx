import type { ReactNode } from 'react';
import { requirePageRole } from '@/lib/auth';
import { SubNav } from '@/components/shell/SubNav';

// Admin pages: people and the captured mail. Each page checks the role itself as well, since layouts and
// pages render independently.
export default async function AdminLayout({ children }: { children: ReactNode }) {
  await requirePageRole('admin');
  return (
    <div>
      <SubNav
        label="Admin"
        items={[
          { href: '/admin/people', label: 'People' },
          { href: '/admin/mail', label: 'Mail' },
        ]}
      />
      {children}
    </div>
  );
}
