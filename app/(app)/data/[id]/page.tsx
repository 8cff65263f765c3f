import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { DatasetActions } from '@/components/data/dataset-actions';
import { ConversionStatus } from '@/components/data/conversion-status';
import { StatusBadge } from '@/components/data/datasets-table';
import { DatasetReport } from '@/components/data/dataset-report';
import { DefaultDefinitions } from '@/components/data/default-definitions';
import { formatSize, kindLabels } from '@/components/data/format';
import { SegmentHistory } from '@/components/data/segment-history';
import { Breadcrumbs } from '@/components/layout/breadcrumbs';
import { ScrollBox } from '@/components/layout/scroll-box';
import { FindingsSection } from '@/components/findings/findings-section';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getDataset, listDatasets, type DatasetDetailDto } from '@/lib/dal/datasets';
import { findingsPanel } from '@/lib/dal/findings';
import { AppError } from '@/lib/errors';
import { count, when } from '@/lib/format';

export const metadata: Metadata = { title: 'Dataset' };

async function load(id: string): Promise<DatasetDetailDto> {
  const actor = await requireUser();
  const n = Number(id);
  if (!Number.isSafeInteger(n) || n <= 0) notFound();
  try {
    return await getDataset(actor, n);
  } catch (err) {
    if (err instanceof AppError && err.kind === 'not_found') notFound();
    throw err;
  }
}

/**
 * A dataset: what it is and where it came from, its conventions, each segment's history, its data
 * check report (right under the heading just after an upload, `?uploaded=1`), and what its owner
 * may do with it; "Fit this dataset" starts the New fit form on it.
 */
export default async function DatasetPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ uploaded?: string }> }) {
  const { id } = await params;
  const justUploaded = (await searchParams).uploaded === '1';
  const d = await load(id);
  const actor = await requireUser();
  const newer = d.canManage && !d.supersededBy ? (await listDatasets(actor)).filter((x) => x.id !== d.id && x.status === 'ready' && !x.supersededBy && x.createdAt >= d.createdAt) : [];
  const findings = await findingsPanel(actor, { type: 'dataset', id: d.id });
  const inUse = d.usedBy.fits + d.usedBy.assumptions > 0;
  const rows = d.segments.reduce((n, s) => n + s.rows.length, 0);
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <Breadcrumbs trail={[{ href: '/data', label: 'Data' }]} current={d.name} />
          <h1 className="break-words">
            {d.name} <span className="text-base font-normal text-[var(--color-muted)]">no. {d.id}</span>
          </h1>
          <p className="text-sm text-[var(--color-muted)] break-words">
            {kindLabels[d.kind]} · {d.fileName} ({formatSize(d.sizeBytes)}) · uploaded {when(d.createdAt)} by {d.uploadedBy.name} ·{' '}
            <StatusBadge d={d} />
          </p>
          {d.description ? <p className="mt-1 max-w-3xl text-sm">{d.description}</p> : null}
        </div>
        <div className="flex flex-wrap gap-2">
          {d.status === 'ready' && can(actor.role, 'fits:run') ? (
            <Link className="btn text-sm no-underline" href={`/fits/new?datasetId=${d.id}`} data-testid="fit-this-dataset">
              Fit this dataset
            </Link>
          ) : null}
          {d.status === 'ready' ? (
            <a className="btn btn-quiet text-sm no-underline" href={`/api/datasets/${d.id}/cohorts.csv`} download>
              Cohort rows (CSV)
            </a>
          ) : null}
          <a className="btn btn-quiet text-sm no-underline" href={`/api/datasets/${d.id}/file`} download>
            Original file (.gz)
          </a>
        </div>
      </div>

      {justUploaded && d.status === 'ready' && d.report ? (
        <p className="notice-good" role="status" data-testid="upload-accepted">
          Accepted: {count(rows, 'cohort row')} in {count(d.segments.length, 'segment')}, with {count(d.report.warningCount, 'warning')}. Its data
          check report is right below{d.report.warningCount > 0 ? ': review the warnings, and waive a rule with a reason if it is expected' : ''}.
        </p>
      ) : null}
      {justUploaded ? <DatasetReport d={d} /> : null}

      {d.supersededBy ? (
        <p className="notice-caution text-sm">
          Superseded by <Link href={`/data/${d.supersededBy.id}`}>dataset no. {d.supersededBy.id} ({d.supersededBy.name})</Link>. It is kept
          unchanged for the record.
        </p>
      ) : null}
      {d.supersedes.length > 0 ? (
        <p className="text-sm">
          Supersedes:{' '}
          {d.supersedes.map((s, i) => (
            <span key={s.id}>
              {i > 0 ? ', ' : ''}
              <Link href={`/data/${s.id}`}>no. {s.id} ({s.name})</Link>
            </span>
          ))}
        </p>
      ) : null}
      {d.status === 'processing' && d.report ? <ConversionStatus reportId={d.report.id} /> : null}
      {d.status === 'failed' ? (
        <div className="notice-bad space-y-1 text-sm" role="alert">
          <p className="font-medium">This loan tape has no cohorts: its conversion did not finish.</p>
          <p>{d.report?.message ?? d.job?.error ?? 'No reason was recorded.'}</p>
          {d.canDelete ? <p>You can delete this dataset below once you have uploaded the file again.</p> : null}
        </div>
      ) : null}

      <section className="panel space-y-2 p-5" aria-labelledby="conv-heading">
        <h2 id="conv-heading">Conventions</h2>
        <p className="text-sm">
          {d.status === 'ready'
            ? d.conventions?.text ?? 'None recorded.'
            : d.status === 'processing'
              ? 'Written here when the conversion finishes (reference date, exit convention, as-of date and the cohorts included).'
              : 'None: the tape was not converted.'}
        </p>
        <p className="num text-xs text-[var(--color-muted)] break-all">SHA-256 {d.sha256}</p>
        {d.censored.length > 0 ? (
          <details className="text-sm">
            <summary className="cursor-pointer">Censored vintage-years: {d.censored.length} (left out of the annual cohorts)</summary>
            <ScrollBox label="Censored vintage-years" className="mt-2">
            <table className="table">
              <thead>
                <tr>
                  <th scope="col">Segment</th>
                  <th scope="col">Vintage</th>
                  <th scope="col">Year</th>
                  <th scope="col">Why</th>
                </tr>
              </thead>
              <tbody>
                {d.censored.map((c) => (
                  <tr key={`${c.segment}-${c.vintage}-${c.year}`}>
                    <td>{c.segment}</td>
                    <td className="num">{c.vintage}</td>
                    <td className="num">{c.year}</td>
                    <td className="text-xs">{c.reason}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            </ScrollBox>
          </details>
        ) : null}
        {d.status === 'ready' ? <DefaultDefinitions uploadField={d.defaultDefinition} segments={d.segments} /> : null}
        <p className="text-xs text-[var(--color-muted)]">
          A correlation fitted on these cohorts is valid only with the default definition and the one-year horizon they were counted on.
        </p>
      </section>

      {d.segments.length > 0 ? (
        <section className="space-y-4" aria-labelledby="hist-heading">
          <h2 id="hist-heading">Segment histories</h2>
          {d.segments.map((s) => (
            <SegmentHistory key={s.segmentId} datasetId={d.id} segment={s} />
          ))}
        </section>
      ) : null}

      {!justUploaded ? <DatasetReport d={d} /> : null}

      {d.canManage || d.canDelete ? (
        <section className="panel p-5" aria-labelledby="manage-heading">
          <h2 id="manage-heading" className="mb-2">
            Manage
          </h2>
          <p className="mb-3 max-w-3xl text-sm text-[var(--color-muted)]">
            {d.supersededBy
              ? 'A dataset is never edited; this one is kept unchanged for the record.'
              : 'A dataset is never edited. To correct it, upload the corrected file and choose this dataset under “Replaces” on the upload page, or mark it superseded here by a newer dataset.'}{' '}
            {inUse
              ? `It cannot be deleted: ${[
                  d.usedBy.fits ? count(d.usedBy.fits, 'fit') : '',
                  d.usedBy.assumptions ? count(d.usedBy.assumptions, 'assumption version') : '',
                ]
                  .filter(Boolean)
                  .join(' and ')} refer${d.usedBy.fits + d.usedBy.assumptions === 1 ? 's' : ''} to it.`
              : 'Deleting removes its rows and stored file; its upload report is kept.'}
          </p>
          <DatasetActions datasetId={d.id} canDelete={d.canDelete} canSupersede={d.canManage && !d.supersededBy} newer={newer} />
        </section>
      ) : null}
      <FindingsSection {...findings} />
    </div>
  );
}
