import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth';
import { sourceModelLineage } from '@/lib/lineage';
import { LineagePage } from '@/components/lineage/LineagePage';

export const metadata: Metadata = { title: 'Lineage' };

export default async function Page({ params }: { params: Promise<{ slug: string }> }) {
  await requirePageRole();
  const lineage = await sourceModelLineage((await params).slug);
  if (!lineage) notFound();
  return <LineagePage lineage={lineage} />;
}
