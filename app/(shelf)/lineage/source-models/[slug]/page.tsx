import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { sourceModelLineage } from '@/lib/lineage';
import { PageHeader } from '@/components/shell/PageHeader';
import { LineageGraph } from '@/components/lineage/LineageGraph';
import { LineageList } from '@/components/lineage/LineageList';
import { LineageKey } from '@/components/lineage/LineageKey';

export const metadata: Metadata = { title: 'Lineage' };

export default async function LineagePage({ params }: { params: Promise<{ slug: string }> }) {
  await requirePageRole();
  const lineage = await sourceModelLineage((await params).slug);
  if (!lineage) notFound();
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
