// Shown while a shelf page loads its data on the server.
export function PageLoading() {
  return (
    <div aria-busy="true" aria-live="polite">
      <div className="mb-6">
        <div className="h-7 w-56 animate-pulse rounded-sheet bg-sheet-sunk" />
        <div className="mt-2 h-4 w-96 animate-pulse rounded-sheet bg-sheet-sunk" />
        <div className="grid-rule mt-3" aria-hidden="true" />
      </div>
      <p className="text-sm text-graphite-soft">Loading…</p>
    </div>
  );
}
