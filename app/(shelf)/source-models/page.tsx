import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';

export const metadata: Metadata = { title: 'Source models' };

export default async function SourceModelsPage() {
  await requirePageRole();
  return (
    <>
      <PageHeader
        title="Source models"
        lead="Full-order state-space models as uploaded, each with numbered versions (v1, v2, …) and its analysis."
      />
      <EmptyState
        title="No source models yet"
        willAppear="Each uploaded model will be listed here with its versions, size (states, inputs, outputs), checksum and uploader. Opening a version will show its poles, damping, stiffness ratio and Hankel singular values, so you can judge how many states a reduced model needs."
        meanwhile={[
          'Gather the full models you want to reduce as JSON (A, B, C, D, or M, D, K for second-order models), Matrix Market or CSV files.',
          'Decide which inputs and outputs your controller needs: a reduced model keeps the behaviour between exactly those channels, so trimming them first makes a smaller, more accurate model.',
        ]}
      />
    </>
  );
}
