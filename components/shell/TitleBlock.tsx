import Link from 'next/link';
import { ROLE_LABELS, type Role } from '@/lib/roles';

/** Who is signed in, set like the title block in the corner of a drawing sheet. */
export function TitleBlock({ name, email, role }: { name: string; email: string; role: Role }) {
  return (
    <div className="border border-rule-strong bg-sheet-raised text-xs" data-testid="title-block">
      <div className="grid grid-cols-[auto_1fr] divide-x divide-rule">
        <span className="field-label px-2 py-1">Signed in</span>
        <span className="truncate px-2 py-1 font-medium" title={email}>
          {name}
        </span>
      </div>
      <div className="grid grid-cols-[auto_1fr_auto] divide-x divide-rule border-t border-rule">
        <span className="field-label px-2 py-1">Role</span>
        <span className="px-2 py-1" data-testid="current-role">
          {ROLE_LABELS[role]}
        </span>
        <Link href="/signout" className="px-2 py-1">
          Sign out
        </Link>
      </div>
    </div>
  );
}
