import type { ReactNode } from 'react';

/** A page's title, a sentence on what it is for, optional actions, and the grid rule beneath. */
export function PageHeader({ title, lead, actions }: { title: string; lead?: ReactNode; actions?: ReactNode }) {
  return (
    <header className="mb-6">
      <div className="flex flex-wrap items-end justify-between gap-4 pb-2">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
          {lead ? <p className="mt-1 max-w-3xl text-sm text-graphite-soft">{lead}</p> : null}
        </div>
        {actions ? <div className="flex gap-2">{actions}</div> : null}
      </div>
      <div className="grid-rule" aria-hidden="true" />
    </header>
  );
}
