export default function Loading() {
  return (
    <main className="mx-auto max-w-xl px-6 py-16" aria-busy="true">
      <p className="text-sm text-graphite-soft">Loading…</p>
    </main>
  );
}
