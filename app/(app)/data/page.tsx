import { HydrationBoundary } from '@tanstack/react-query';
import type { Metadata } from 'next';
import Link from 'next/link';
import { DatasetsTable } from '@/components/data/datasets-table';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { datasetsQuery } from '@/lib/client/datasets';
import { dehydrated } from '@/lib/client/prefetch';
import { listDatasets } from '@/lib/dal/datasets';
import { assetClassLabels } from '@/lib/asset-classes';
import { listSegments } from '@/lib/dal/segments';

export const metadata: Metadata = { title: 'Data' };

export default async function DataPage() {
  const actor = await requireUser();
  const [datasets, segments] = await Promise.all([listDatasets(actor), listSegments(actor)]);
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1>Data</h1>
          <p className="text-sm text-[var(--color-muted)]">
            Uploaded default histories, their data check reports and the annual cohorts made of them.
          </p>
        </div>
        {can(actor.role, 'datasets:upload') ? (
          <Link href="/data/upload" className="btn no-underline">
            Upload a file
          </Link>
        ) : null}
      </div>
      <section className="panel p-5" aria-labelledby="datasets-heading">
        <h2 id="datasets-heading" className="mb-3">
          Datasets
        </h2>
        <HydrationBoundary state={dehydrated((qc) => qc.setQueryData(datasetsQuery().queryKey, datasets))}>
          <DatasetsTable canUpload={can(actor.role, 'datasets:upload')} />
        </HydrationBoundary>
      </section>
      <section className="panel p-5" aria-labelledby="segments-heading">
        <h2 id="segments-heading" className="mb-3">
          Segments
        </h2>
        <table className="table">
          <thead>
            <tr>
              <th scope="col">Segment</th>
              <th scope="col">Asset class (supervisory benchmark)</th>
              <th scope="col">Owner</th>
              <th scope="col" className="text-right">
                Datasets
              </th>
              <th scope="col" className="text-right">
                Cohort rows
              </th>
            </tr>
          </thead>
          <tbody>
            {segments.map((s) => (
              <tr key={s.id}>
                <td>
                  <Link href={`/data/segments/${s.id}`}>{s.name}</Link>
                </td>
                <td>
                  {assetClassLabels[s.assetClass]}
                  {s.assetClass === 'sme-corporate' && s.turnoverEurMillions !== null ? `, EUR ${s.turnoverEurMillions} m` : ''}
                </td>
                <td>{s.owner?.name ?? '—'}</td>
                <td className="num text-right">{s.datasetCount.toLocaleString('en-GB')}</td>
                <td className="num text-right">{s.rowCount.toLocaleString('en-GB')}</td>
              </tr>
            ))}
            {segments.length === 0 ? (
              <tr>
                <td colSpan={5} className="py-6 text-center text-[var(--color-muted)]">
                  No segments yet. A segment appears when an accepted file names it; its asset class and owner are set on its page.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </section>
    </div>
  );
}
