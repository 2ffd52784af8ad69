'use client';
import Link from 'next/link';
import { usePathname } from 'next/navigation';
import type { NavItem } from './nav-items';

function isCurrent(pathname: string, href: string): boolean {
  if (href === '/') return pathname === '/';
  const section = href.split('/').slice(0, 2).join('/');
  return pathname === href || pathname.startsWith(`${section}/`) || pathname === section;
}

export function Nav({ items }: { items: NavItem[] }) {
  const pathname = usePathname();
  return (
    <nav aria-label="Sections">
      <ul className="space-y-0.5">
        {items.map((item) => {
          const current = isCurrent(pathname, item.href);
          return (
            <li key={item.href}>
              <Link
                href={item.href}
                aria-current={current ? 'page' : undefined}
                className={`flex items-baseline gap-3 border-l-2 px-3 py-1.5 text-sm no-underline hover:no-underline ${
                  current
                    ? 'border-teal bg-teal-soft/60 font-medium text-teal-deep'
                    : 'border-transparent text-graphite hover:border-rule-strong hover:text-teal'
                }`}
              >
                <span className="num text-xs text-graphite-faint">{item.sheet}</span>
                <span>{item.label}</span>
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
