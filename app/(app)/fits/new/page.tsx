import type { Metadata } from 'next';
import { forbidden } from 'next/navigation';
import { z } from 'zod';
import { NewFitForm } from '@/components/fits/new-fit-form';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listFittableDatasets } from '@/lib/dal/fits';

export const metadata: Metadata = { title: 'New fit' };

/** The New fit form; `?datasetId=N` (from a dataset page's "Fit this dataset") starts it on that dataset. */
export default async function NewFitPage({ searchParams }: { searchParams: Promise<{ datasetId?: string }> }) {
  const actor = await requireUser();
  if (!can(actor.role, 'fits:run')) forbidden();
  const asked = z.coerce.number().int().positive().safeParse((await searchParams).datasetId);
  const datasets = await listFittableDatasets(actor);
  const askedMissing = asked.success && !datasets.some((d) => d.id === asked.data);
  return (
    <div className="space-y-4">
      <div>
        <Breadcrumbs trail={[{ href: '/fits', label: 'Fits' }]} current="New fit" />
        <h1>New fit</h1>
        <p className="mt-1 max-w-3xl text-sm text-[var(--color-muted)]">
          Estimates the asset correlation of each chosen segment by the five estimators, with profile-likelihood intervals, diagnostics and
          what the estimate means. A worker computes it; you can follow its progress and leave the page.
        </p>
      </div>
      {askedMissing ? (
        <p className="notice-caution text-sm" role="note">
          Dataset no. {asked.data} cannot be fitted (it is not ready, or it does not exist): choose another below.
        </p>
      ) : null}
      <section className="panel max-w-4xl p-5">
        <NewFitForm
          datasets={datasets.map(({ id, name, kind, superseded, segments }) => ({ id, name, kind, superseded, segments }))}
          initialDatasetId={asked.success ? asked.data : undefined}
        />
      </section>
    </div>
  );
}
