// The body of both lineage pages (per source model and per reduced model): header, key, graph and the same
// lineage in words. The pages only load the lineage they are about.
import type { Lineage } from '@/lib/lineage';
import { PageHeader } from '@/components/shell/PageHeader';
import { LineageGraph } from '@/components/lineage/LineageGraph';
import { LineageList } from '@/components/lineage/LineageList';
import { LineageKey } from '@/components/lineage/LineageKey';

export function LineagePage({ lineage }: { lineage: Lineage }) {
  return (
    <>
      <PageHeader
        title={lineage.title}
        lead="Where each reduced model version came from and what depends on it: source versions, the reduced versions made from them (dashed: made from an earlier reduced version), and the controller projects whose pins resolve to them."
      />
      <div className="space-y-4">
        <LineageKey />
        <LineageGraph lineage={lineage} />
        <LineageList lineage={lineage} />
      </div>
    </>
  );
}
