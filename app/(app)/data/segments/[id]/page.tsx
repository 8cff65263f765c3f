import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { SegmentSettingsForm } from '@/components/data/segment-settings-form';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { kindLabels } from '@/components/data/format';
import { assetClassLabels } from '@/lib/asset-classes';
import { getSegment, listPossibleOwners, listSegmentDatasets, type SegmentDto } from '@/lib/dal/segments';
import { AppError } from '@/lib/errors';
import { updateSegmentAction } from '../actions';

export const metadata: Metadata = { title: 'Segment settings' };

export default async function SegmentPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requireUser();
  const n = Number(id);
  if (!Number.isSafeInteger(n) || n <= 0) notFound();
  let s: SegmentDto;
  try {
    s = await getSegment(actor, n);
  } catch (err) {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  }
  const editable = can(actor.role, 'segments:manage');
  const [owners, history] = await Promise.all([editable ? listPossibleOwners(actor) : Promise.resolve([]), listSegmentDatasets(actor, s.id)]);
  return (
    <div className="max-w-5xl space-y-4">
      <p className="text-sm">
        <Link href="/data">← Data</Link>
      </p>
      <h1>{s.name}</h1>
      <p className="text-sm text-[var(--color-muted)]">
        {s.rowCount} cohort rows in {s.datasetCount} dataset{s.datasetCount === 1 ? '' : 's'} · owner {s.owner?.name ?? 'none'}
      </p>
      <section className="panel space-y-3 p-5">
        <h2>Settings</h2>
        {editable ? (
          <SegmentSettingsForm segment={s} owners={owners} labels={assetClassLabels} action={updateSegmentAction} />
        ) : (
          <dl className="grid grid-cols-[12rem_1fr] gap-1 text-sm">
            <dt className="text-[var(--color-muted)]">Asset class</dt>
            <dd>{assetClassLabels[s.assetClass]}</dd>
            <dt className="text-[var(--color-muted)]">Turnover</dt>
            <dd>{s.turnoverEurMillions !== null ? `EUR ${s.turnoverEurMillions} million` : '—'}</dd>
            <dt className="text-[var(--color-muted)]">Description</dt>
            <dd>{s.description ?? '—'}</dd>
          </dl>
        )}
      </section>
      <section className="panel space-y-3 p-5" aria-labelledby="seg-datasets-heading">
        <h2 id="seg-datasets-heading">Datasets with this segment</h2>
        {history.length === 0 ? (
          <p className="text-sm text-[var(--color-muted)]">No dataset holds rows of this segment any more.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="table">
              <caption className="sr-only">Datasets holding rows of {s.name}</caption>
              <thead>
                <tr>
                  <th scope="col">Dataset</th>
                  <th scope="col">Kind</th>
                  <th scope="col">Periods</th>
                  <th scope="col" className="text-right">
                    Obligor-years
                  </th>
                  <th scope="col" className="text-right">
                    Defaults
                  </th>
                  <th scope="col" className="text-right">
                    Pooled rate
                  </th>
                </tr>
              </thead>
              <tbody>
                {history.map((h) => (
                  <tr key={h.id} className={h.supersededById !== null ? 'text-[var(--color-muted)]' : ''}>
                    <td>
                      <Link href={`/data/${h.id}`}>
                        No. {h.id}: {h.name}
                      </Link>
                      {h.supersededById !== null ? <div className="text-xs">superseded by no. {h.supersededById}</div> : null}
                    </td>
                    <td className="whitespace-nowrap">{kindLabels[h.kind]}</td>
                    <td className="num whitespace-nowrap">
                      {h.firstPeriod}–{h.lastPeriod} ({h.rows})
                    </td>
                    <td className="num text-right">{h.obligors.toLocaleString('en-GB')}</td>
                    <td className="num text-right">{h.defaults.toLocaleString('en-GB')}</td>
                    <td className="num text-right">{h.obligors > 0 ? `${((100 * h.defaults) / h.obligors).toFixed(2)}%` : '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <p className="notice-caution text-sm">
        The asset class chooses the supervisory correlation shown beside estimates (Basel IRB, BCBS 2006 paras 272-273 and 328-330).
        Supervisory correlations are policy settings, not estimates of this portfolio.
      </p>
    </div>
  );
}
