import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { UploadForm } from '@/components/data/upload-form';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listDatasets } from '@/lib/dal/datasets';

export const metadata: Metadata = { title: 'Upload data' };

export default async function UploadPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'datasets:upload')) forbidden();
  const supersedable = (await listDatasets(actor)).filter((d) => d.status === 'ready' && !d.supersededBy).map((d) => ({ id: d.id, name: d.name }));
  return (
    <div className="space-y-4">
      <p className="text-sm">
        <Link href="/data">← Data</Link>
      </p>
      <h1>Upload a file</h1>
      <p className="max-w-3xl text-sm text-[var(--color-muted)]">
        Every row is checked in one pass. Errors block the upload and nothing is stored but the report; warnings can be waived
        with a reason on the dataset page. Loan-level tapes are stored at once and converted to annual cohorts by the worker.
      </p>
      <UploadForm supersedable={supersedable} />
    </div>
  );
}
