import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { PageHeader } from '@/components/shell/PageHeader';
import { EmptyState } from '@/components/shell/EmptyState';

export const metadata: Metadata = { title: 'Reduced models' };

export default async function ReducedModelsPage() {
  await requirePageRole();
  return (
    <>
      <PageHeader
        title="Reduced models"
        lead="Reduced-order models registered on the shelf, with their recipe, accuracy report and review state."
      />
      <EmptyState
        title="No reduced models yet"
        willAppear="Each reduced model will show its versions with the source version and recipe that produced it (method, order, tolerance), its state (draft, in review, approved, revise, retired), and an accuracy report: frequency and step responses of full and reduced model side by side, with the error against its bound."
        meanwhile={[
          'Reduced models are made from source models; the first one appears once an engineer uploads a source model and runs a reduction.',
          'A reduced model is an approximation valid within its reported error bounds and frequency band; approval here records a review, not a certification.',
        ]}
      />
    </>
  );
}
