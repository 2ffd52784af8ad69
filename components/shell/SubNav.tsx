'use client';
import Link from 'next/link';
import { usePathname } from 'next/navigation';

/** Tabs between the pages of one section (e.g. Admin › People and Admin › Mail). */
export function SubNav({ label, items }: { label: string; items: { href: string; label: string }[] }) {
  const pathname = usePathname();
  return (
    <nav aria-label={label} className="mb-4 flex gap-1 border-b border-rule text-sm">
      {items.map((item) => {
        const current = pathname === item.href;
        return (
          <Link
            key={item.href}
            href={item.href}
            aria-current={current ? 'page' : undefined}
            className={`-mb-px border-b-2 px-3 py-1.5 no-underline hover:no-underline ${
              current ? 'border-teal font-medium text-teal-deep' : 'border-transparent text-graphite-soft hover:text-teal'
            }`}
          >
            {item.label}
          </Link>
        );
      })}
    </nav>
  );
}
