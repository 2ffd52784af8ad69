import Link from 'next/link';
import type { ReactNode } from 'react';
import { requirePageRole } from '@/lib/auth';
import { Nav } from '@/components/shell/Nav';
import { navItemsFor } from '@/components/shell/nav-items';
import { TitleBlock } from '@/components/shell/TitleBlock';

// The shelf: every page a signed-in person works in. proxy.ts already sends signed-out visitors to
// /signin; this check also catches a session whose account was deactivated since.
export default async function ShelfLayout({ children }: { children: ReactNode }) {
  const user = await requirePageRole();
  return (
    <div className="mx-auto flex min-h-screen max-w-[1400px]">
      <aside className="sticky top-0 flex h-screen w-rail shrink-0 flex-col border-r border-rule bg-sheet/80 px-3 py-5">
        <Link href="/" className="mb-1 px-3 text-lg font-semibold tracking-tight text-graphite no-underline hover:no-underline">
          Modeshelf
        </Link>
        <p className="mb-3 px-3 text-xs text-graphite-soft">reduced-order model registry</p>
        <div className="grid-rule mx-3 mb-4" aria-hidden="true" />
        <Nav items={navItemsFor(user.role)} />
        <div className="mt-auto px-1">
          <Link href="/profile" className="mb-2 block px-2 text-xs">Profile and notifications</Link>
          <TitleBlock name={user.name} email={user.email} role={user.role} />
        </div>
      </aside>
      <main className="min-w-0 flex-1 px-8 py-6">{children}</main>
    </div>
  );
}
