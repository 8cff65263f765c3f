import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { DatasetActions } from '@/components/data/dataset-actions';
import { StatusBadge } from '@/components/data/datasets-table';
import { DefaultRateChart } from '@/components/data/default-rate-chart';
import { formatSize, formatWhen, kindLabels } from '@/components/data/format';
import { ReportTable } from '@/components/data/report-table';
import { WaiveForm } from '@/components/data/waive-form';
import { requireUser } from '@/lib/auth/session';
import { getDataset, listDatasets, type DatasetDetailDto } from '@/lib/dal/datasets';
import { assetClassLabels } from '@/lib/dal/segments';
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
  const waived = new Set(d.waivers.map((w) => w.rule));
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
      {d.status === 'processing' ? (
        <p className="notice-caution text-sm" role="status">
          The worker is converting this loan tape ({d.job?.progress ?? 0}%{d.job?.message ? `: ${d.job.message}` : ''}). Reload the page to see the cohorts.
        </p>
      ) : null}
      {d.status === 'failed' ? <p className="notice-bad text-sm">The conversion failed: {d.job?.error ?? 'unknown error'}.</p> : null}

      <section className="panel space-y-2 p-5" aria-labelledby="conv-heading">
        <h2 id="conv-heading">Conventions</h2>
        <p className="text-sm">{d.conventions?.text ?? 'None recorded.'}</p>
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
                  {assetClassLabels[s.assetClass]} · {s.rows.length} periods
                </p>
                <div className="max-h-64 overflow-auto">
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
            {d.report.errorCount} errors, {d.report.warningCount} warnings
            {d.report.summary.truncated ? ' (only the first 1,000 findings of each rule are kept)' : ''}.
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
          {d.canManage ? <WaiveForm datasetId={d.id} rules={warningRules} /> : null}
          <ReportTable issues={d.report.issues} caption="Validation report" />
        </section>
      ) : null}

      {d.canManage || d.canDelete ? (
        <section className="panel p-5" aria-labelledby="manage-heading">
          <h2 id="manage-heading" className="mb-2">
            Manage
          </h2>
          <DatasetActions datasetId={d.id} canDelete={d.canDelete} canSupersede={d.canManage && !d.supersededBy} newer={newer} />
        </section>
      ) : null}
    </div>
  );
}
