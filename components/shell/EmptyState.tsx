import type { ReactNode } from 'react';

/**
 * A section that has nothing to show yet: what will appear here, and what the reader can do meanwhile.
 */
export function EmptyState({
  title,
  willAppear,
  meanwhile,
}: {
  title: string;
  willAppear: ReactNode;
  meanwhile: ReactNode[];
}) {
  return (
    <section className="panel max-w-3xl p-6" aria-label={title}>
      <h2 className="text-base font-semibold">{title}</h2>
      <p className="mt-2 text-sm text-graphite-soft">{willAppear}</p>
      <h3 className="field-label mt-5">Meanwhile</h3>
      <ul className="mt-2 list-disc space-y-1 pl-5 text-sm">
        {meanwhile.map((item, i) => (
          <li key={i}>{item}</li>
        ))}
      </ul>
    </section>
  );
}
