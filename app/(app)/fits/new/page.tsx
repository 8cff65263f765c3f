import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { NewFitForm } from '@/components/fits/new-fit-form';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listFittableDatasets } from '@/lib/dal/fits';

export const metadata: Metadata = { title: 'New fit' };

export default async function NewFitPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'fits:run')) forbidden();
  const datasets = await listFittableDatasets(actor);
  return (
    <div className="space-y-4">
      <div>
        <h1>New fit</h1>
        <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]">
          Estimates the asset correlation of each chosen segment by the five estimators, with profile-likelihood intervals,
          diagnostics and what the estimate means. A worker computes it; you can follow its progress and leave the page.
        </p>
      </div>
      <section className="panel max-w-4xl p-5">
        <NewFitForm datasets={datasets.map(({ id, name, kind, superseded, segments }) => ({ id, name, kind, superseded, segments }))} />
      </section>
    </div>
  );
}
