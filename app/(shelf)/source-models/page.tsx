import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageRole } from '@/lib/auth';
import { listSourceModels, sourceModelListSchema } from '@/lib/source-models';
import { PageHeader } from '@/components/shell/PageHeader';
import { SourceModelsTable } from '@/components/source-models/SourceModelsTable';

export const metadata: Metadata = { title: 'Source models' };
export const dynamic = 'force-dynamic';

export default async function SourceModelsPage() {
  const user = await requirePageRole();
  const initial = await listSourceModels(sourceModelListSchema.parse({}));
  return (
    <>
      <PageHeader
        title="Source models"
        lead="Full-order state-space models as uploaded, each with numbered versions (v1, v2, …) and its analysis: poles, stiffness and Hankel singular values."
        actions={
          user.role === 'engineer' ? (
            <Link className="button-primary no-underline hover:no-underline" href="/source-models/new">
              Upload a source model
            </Link>
          ) : null
        }
      />
      <SourceModelsTable initial={initial} />
    </>
  );
}
