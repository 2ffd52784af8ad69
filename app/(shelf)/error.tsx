'use client';
// A shelf page failed while rendering. The shell stays; the reader can retry without losing their place.
import { useEffect } from 'react';

export default function ShelfError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  useEffect(() => {
    console.error(error);
  }, [error]);
  return (
    <section className="panel max-w-2xl p-6" role="alert">
      <h1 className="text-lg font-semibold">This page could not be shown</h1>
      <p className="mt-2 text-sm text-graphite-soft">
        The server hit an error while preparing it. Nothing you entered was lost. Try again; if it keeps failing,
        tell your admin and quote the reference below.
      </p>
      {error.digest ? <p className="num mt-3 text-xs text-graphite-soft">reference {error.digest}</p> : null}
      <button type="button" className="button-primary mt-4" onClick={reset}>
        Try again
      </button>
    </section>
  );
}
