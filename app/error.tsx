'use client';
// Last-resort boundary for pages outside the shelf layout (sign-in, links).
import { useEffect } from 'react';

export default function RootError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  return (
    <main className="mx-auto max-w-xl px-6 py-16" role="alert">
      <h1 className="text-2xl font-semibold">Something went wrong</h1>
      <div className="grid-rule my-3" aria-hidden="true" />
      <p className="text-sm text-graphite-soft">
        The server could not prepare this page. Try again; if it keeps failing, tell your admin and quote the
        reference.
      </p>
      {error.digest ? <p className="num mt-3 text-xs text-graphite-soft">reference {error.digest}</p> : null}
      <button type="button" className="button-primary mt-4" onClick={reset}>
        Try again
      </button>
    </main>
  );
}
