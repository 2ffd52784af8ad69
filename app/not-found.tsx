import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl px-6 py-16">
      <p className="num text-xs text-graphite-soft">404</p>
      <h1 className="text-2xl font-semibold">No such page on the shelf</h1>
      <div className="grid-rule my-3" aria-hidden="true" />
      <p className="text-sm text-graphite-soft">
        The address may be mistyped, or the thing it pointed to was renamed. Models and versions are never deleted,
        only retired, so an old link to one should still work.
      </p>
      <p className="mt-4 text-sm">
        <Link href="/">Go to the dashboard</Link>
      </p>
    </main>
  );
}
