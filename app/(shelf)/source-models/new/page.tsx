import type { Metadata } from 'next';
import { requirePageRole } from '@/lib/auth';
import { PageHeader } from '@/components/shell/PageHeader';
import { UploadForm } from '@/components/source-models/UploadForm';

export const metadata: Metadata = { title: 'Upload a source model' };

export default async function NewSourceModelPage() {
  await requirePageRole('engineer');
  return (
    <>
      <PageHeader
        title="Upload a source model"
        lead="One JSON file (first-order A, B, C, D, or second-order mass, damping, stiffness, force), or the matrices as Matrix Market or CSV files. The engine checks the files before anything is stored; its analysis starts at once."
      />
      <UploadForm />
    </>
  );
}
