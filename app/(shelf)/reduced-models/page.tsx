import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageRole } from '@/lib/auth';
import { listReducedModels } from '@/lib/reduced-models';
import type { VersionStatus } from '@/lib/review/state-machine';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';
import { StatusBadge, UpstreamChangedBadge } from '@/components/review/StatusBadge';
import { reducedModelsUpstream } from '@/lib/upstream';
import { formatPercent } from '@/lib/format';
import { methodName } from '@/lib/recipe-words';
import { acceptanceWord } from '@/lib/acceptance';

export const metadata: Metadata = { title: 'Reduced models' };
export const dynamic = 'force-dynamic';

export default async function ReducedModelsPage() {
  await requirePageRole();
  const models = await listReducedModels();
  const upstream = await reducedModelsUpstream(models.map((m) => m.id));
  return (
    <>
      <PageHeader
        title="Reduced models"
        lead="Reduced-order models registered on the shelf, with their recipe, accuracy report and review state. A reduced model is an approximation valid within its reported error bounds and frequency band."
      />
      {models.length === 0 ? (
        <EmptyState
          title="No reduced models yet"
          willAppear="Each reduced model will show its versions with the source version and recipe that produced it, its state, and its accuracy report."
          meanwhile={['Reduced models are made from source models: open an analysed source version and run a recipe.']}
        />
      ) : (
        <section aria-label="Reduced models" className="panel overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="reduced-models-table">
            <thead>
              <tr className="border-b border-rule-strong">
                {['Reduced model', 'Source model', 'Latest', 'State', 'Order', 'Method', 'H∞ error, relative', 'Acceptance', 'Author', 'When'].map((h) => (
                  <th key={h} scope="col" className="px-4 py-2 font-medium">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {models.map((m) => (
                <tr key={m.id} className="border-b border-rule last:border-b-0">
                  <td className="px-4 py-2">
                    <Link href={`/reduced-models/${m.slug}`}>{m.name}</Link>
                  </td>
                  <td className="px-4 py-2">
                    <Link href={`/source-models/${m.sourceModel.slug}`}>{m.sourceModel.name}</Link>
                  </td>
                  <td className="px-4 py-2">
                    <Link className="num" href={`/reduced-models/${m.slug}/versions/${m.latest.number}`}>
                      v{m.latest.number}
                    </Link>
                  </td>
                  <td className="px-4 py-2">
                    <StatusBadge status={m.latest.status as VersionStatus} />
                    {upstream.get(m.id)?.upstreamChanged ? <UpstreamChangedBadge sourceNumber={upstream.get(m.id)!.latestSourceNumber} newestSourceNumber={upstream.get(m.id)!.newestSourceNumber} /> : null}
                  </td>
                  <td className="num px-4 py-2">{m.latest.order}</td>
                  <td className="px-4 py-2">{methodName(m.latest.method)}</td>
                  <td className="num px-4 py-2">{m.latest.hInfinityErrorRelative === null ? '—' : formatPercent(m.latest.hInfinityErrorRelative)}</td>
                  <td className="px-4 py-2">{acceptanceWord(m.latest.acceptance)}</td>
                  <td className="px-4 py-2">{m.latest.author}</td>
                  <td className="num px-4 py-2 text-xs">{m.latest.createdAt.replace('T', ' ').slice(0, 16)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      )}
    </>
  );
}
