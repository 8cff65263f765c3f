import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { DatasetActions } from '@/components/data/dataset-actions';
import { ConversionStatus } from '@/components/data/conversion-status';
import { StatusBadge } from '@/components/data/datasets-table';
import { DefaultDefinitions } from '@/components/data/default-definitions';
import { DefaultRateChart } from '@/components/data/default-rate-chart';
import { formatSize, formatWhen, kindLabels } from '@/components/data/format';
import { ReportTable } from '@/components/data/report-table';
import { WaiveForm } from '@/components/data/waive-form';
import { FindingsSection } from '@/components/findings/findings-section';
import { requireUser } from '@/lib/auth/session';
import { getDataset, listDatasets, type DatasetDetailDto } from '@/lib/dal/datasets';
import { findingsPanel } from '@/lib/dal/findings';
import { assetClassLabels } from '@/lib/asset-classes';
import { AppError } from '@/lib/errors';

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

export default async function DatasetPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const d = await load(id);
  const actor = await requireUser();
  const newer = d.canManage && !d.supersededBy ? (await listDatasets(actor)).filter((x) => x.id !== d.id && x.status === 'ready' && !x.supersededBy && x.createdAt >= d.createdAt) : [];
  const findings = await findingsPanel(actor, { type: 'dataset', id: d.id });
  const waived = new Set(d.waivers.map((w) => w.rule));
  const inUse = d.usedBy.fits + d.usedBy.assumptions > 0;
  const warningRules = Object.entries(d.report?.summary.byRule ?? {})
    .filter(([rule, e]) => e.severity === 'warning' && !waived.has(rule))
    .map(([rule, e]) => ({ rule, count: e.count }));
  return (
    <div className="space-y-6">
      <p className="text-sm">
        <Link href="/data">← Data</Link>
      </p>
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h1>
            {d.name} <span className="text-base font-normal text-[var(--color-muted)]">no. {d.id}</span>
          </h1>
          <p className="text-sm text-[var(--color-muted)]">
            {kindLabels[d.kind]} · {d.fileName} ({formatSize(d.sizeBytes)}) · uploaded {formatWhen(d.createdAt)} UTC by {d.uploadedBy.name} ·{' '}
            <StatusBadge d={d} />
          </p>
          {d.description ? <p className="mt-1 max-w-3xl text-sm">{d.description}</p> : null}
        </div>
        <div className="flex flex-wrap gap-2">
          {d.status === 'ready' ? (
            <a className="btn btn-quiet text-sm no-underline" href={`/api/datasets/${d.id}/cohorts.csv`} download>
              Cohort rows (CSV)
            </a>
          ) : null}
          {d.report ? (
            <a className="btn btn-quiet text-sm no-underline" href={`/api/datasets/${d.id}/report.csv`} download>
              Validation report (CSV)
            </a>
          ) : null}
          <a className="btn btn-quiet text-sm no-underline" href={`/api/datasets/${d.id}/file`} download>
            Original file (.gz)
          </a>
        </div>
      </div>

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
            <table className="table mt-2">
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
            <div key={s.segmentId} className="panel grid gap-4 p-5 lg:grid-cols-[minmax(0,22rem)_1fr]">
              <div>
                <h3>
                  <Link href={`/data/segments/${s.segmentId}`}>{s.name}</Link>
                </h3>
                <p className="mb-2 text-xs text-[var(--color-muted)]">
                  {assetClassLabels[s.assetClass]} · {s.rows.length} period{s.rows.length === 1 ? '' : 's'}
                  {s.rows.length > 0 ? `, ${s.rows[0].period}–${s.rows[s.rows.length - 1].period}` : ''}
                </p>
                <div className="max-h-72 overflow-auto">
                  <table className="table">
                    <caption className="sr-only">Obligors and defaults by period, {s.name}</caption>
                    <thead>
                      <tr>
                        <th scope="col">Period</th>
                        <th scope="col" className="text-right">
                          Obligors
                        </th>
                        <th scope="col" className="text-right">
                          Defaults
                        </th>
                        <th scope="col" className="text-right">
                          Rate
                        </th>
                      </tr>
                    </thead>
                    <tbody>
                      {s.rows.map((r) => (
                        <tr key={r.period}>
                          <td className="num">{r.period}</td>
                          <td className="num text-right">{r.obligors.toLocaleString('en-GB')}</td>
                          <td className="num text-right">{r.defaults.toLocaleString('en-GB')}</td>
                          <td className="num text-right">{((100 * r.defaults) / r.obligors).toFixed(2)}%</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              </div>
              <DefaultRateChart name={s.name} rows={s.rows} />
            </div>
          ))}
        </section>
      ) : null}

      {d.report ? (
        <section className="panel space-y-3 p-5" aria-labelledby="report-heading">
          <h2 id="report-heading">Validation report</h2>
          <p className="text-sm text-[var(--color-muted)]">
            {d.report.status === 'processing'
              ? 'The header was checked at upload; the rows are checked by the conversion.'
              : d.report.status === 'failed'
                ? 'Only the header was checked: the rows were not, because the conversion did not finish.'
                : `${d.report.errorCount.toLocaleString('en-GB')} error${d.report.errorCount === 1 ? '' : 's'}, ${d.report.warningCount.toLocaleString('en-GB')} warning${d.report.warningCount === 1 ? '' : 's'}${d.waivers.length > 0 ? `, ${d.waivers.length} rule${d.waivers.length === 1 ? '' : 's'} waived` : ''}${d.report.summary.truncated ? ' (only the first 1,000 findings of each rule are listed)' : ''}.`}
          </p>
          {d.waivers.length > 0 ? (
            <ul className="space-y-1 text-sm">
              {d.waivers.map((w) => (
                <li key={w.rule} className="notice-good">
                  Waived <code>{w.rule}</code> by {w.by} on {formatWhen(w.at)}: {w.reason}
                </li>
              ))}
            </ul>
          ) : null}
          {d.report.status === 'accepted' || d.report.issues.length > 0 ? (
            <ReportTable issues={d.report.issues} caption="Validation report" summary={d.report.summary} waived={[...waived]} />
          ) : null}
          {d.canManage && warningRules.length > 0 ? (
            <div className="space-y-2 border-t border-[var(--color-line)] pt-3">
              <h3>Waive a warning</h3>
              <p className="text-xs text-[var(--color-muted)]">
                Waiving a rule records that the warnings were reviewed and why they are acceptable; the reason is kept with the dataset and
                shown to reviewers.
              </p>
              <WaiveForm datasetId={d.id} rules={warningRules} />
            </div>
          ) : null}
        </section>
      ) : null}

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
                  d.usedBy.fits ? `${d.usedBy.fits} fit${d.usedBy.fits === 1 ? '' : 's'}` : '',
                  d.usedBy.assumptions ? `${d.usedBy.assumptions} assumption version${d.usedBy.assumptions === 1 ? '' : 's'}` : '',
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
