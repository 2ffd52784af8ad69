import Link from 'next/link';

// Rendered (with status 403 where the response has not started yet) when requirePageRole() refuses a role.
export default function Forbidden() {
  return (
    <section className="mx-auto max-w-xl px-6 py-16" data-testid="forbidden">
      <p className="num text-xs text-graphite-soft">403</p>
      <h1 className="text-2xl font-semibold">Not allowed for your role</h1>
      <div className="grid-rule my-3" aria-hidden="true" />
      <p className="text-sm text-graphite-soft">
        This page needs a role your account does not have. If your work needs it, ask an admin to change your role.
      </p>
      <p className="mt-4 text-sm">
        <Link href="/">Go to the dashboard</Link>
      </p>
    </section>
  );
}
