/** How a controller's build pulls this project's models: the pull API's calls with curl, ready to copy. */
export function PullApiHelp({ projectSlug, origin, firstModel }: { projectSlug: string; origin: string; firstModel: string | null }) {
  const base = `${origin}/api/v1/projects/${projectSlug}`;
  const model = firstModel ?? '<reduced-model>';
  const lines = [
    `export MODESHELF_TOKEN=msp_...   # a project token, shown once when made`,
    `curl -H "Authorization: Bearer $MODESHELF_TOKEN" ${base}/pins`,
    `curl -H "Authorization: Bearer $MODESHELF_TOKEN" ${base}/models/${model}`,
    `curl -H "Authorization: Bearer $MODESHELF_TOKEN" -OJ "${base}/models/${model}?format=c&ts=project"`,
    `curl -H "Authorization: Bearer $MODESHELF_TOKEN" -o modeshelf.lock.json ${base}/lock`,
    `curl -H "Authorization: Bearer $MODESHELF_TOKEN" -H "content-type: application/json" --data @modeshelf.lock.json ${base}/lock/verify`,
  ];
  return (
    <section aria-label="Pull API" className="panel px-4 py-3">
      <h2 className="text-base font-semibold">Pull API</h2>
      <p className="mt-1 text-sm text-graphite-soft">
        Formats: <span className="num">format=json|csv|c</span>; discretised by zero-order hold with <span className="num">ts=</span> seconds or{' '}
        <span className="num">ts=project</span>. Every answer carries the SHA-256 of its matrices for <span className="num">modeshelf.lock.json</span>.
      </p>
      <pre className="num mt-2 overflow-x-auto rounded-sheet border border-rule bg-sheet px-3 py-2 text-xs leading-relaxed">{lines.join('\n')}</pre>
    </section>
  );
}
