'use client';

import { useQuery } from '@tanstack/react-query';
import Link from 'next/link';
import { useRef, useState, type DragEvent } from 'react';
import type { UploadIssue } from '@/lib/ingest/findings';
import type { FindingSummary } from '@/lib/ingest/findings';
import { formatSize } from './format';
import { ProgressBar } from './progress-bar';
import { uploadDatasetFile, uploadReportQuery } from '@/lib/client/datasets';
import { ReportTable } from './report-table';

type Kind = 'cohort' | 'vintage' | 'loans';

const kinds: { value: Kind; label: string; columns: string; samples: { href: string; label: string }[] }[] = [
  {
    value: 'cohort',
    label: 'Cohort counts',
    columns: 'segment, period, obligors, defaults (optional default_definition, note, grade: each grade becomes the panel "segment / grade")',
    samples: [
      { href: '/samples/cohort.csv', label: 'Sample cohort file' },
      { href: '/samples/cohort-grades.csv', label: 'Sample with grades (five grades of one portfolio)' },
    ],
  },
  { value: 'vintage', label: 'Vintages', columns: 'segment, vintage (YYYY-MM), months_on_book, active, defaults', samples: [{ href: '/samples/vintage.csv', label: 'Sample vintage file' }] },
  { value: 'loans', label: 'Loan-level tape', columns: 'loan_id, segment, start_date, default_date, exit_date (YYYY-MM-DD)', samples: [{ href: '/samples/loans.csv', label: 'Sample loans file' }] },
];

type Outcome =
  | { type: 'accepted'; id: number; rows: number; segments: string[]; warnings: UploadIssue[] }
  | { type: 'queued'; id: number; reportId: number }
  | { type: 'rejected'; message: string; issues: UploadIssue[]; reportId: number | null; summary?: FindingSummary }
  | { type: 'duplicate'; message: string; datasetId: number }
  | { type: 'error'; message: string };

function toOutcome(status: number, body: Record<string, unknown>): Outcome {
  if (status === 201) return { type: 'accepted', id: body.id as number, rows: body.rows as number, segments: body.segments as string[], warnings: body.warnings as UploadIssue[] };
  if (status === 202) return { type: 'queued', id: body.id as number, reportId: body.reportId as number };
  const message = typeof body.message === 'string' ? body.message : `The server answered ${status}.`;
  if (status === 422 && body.code === 'invalid:upload') {
    return { type: 'rejected', message, issues: body.issues as UploadIssue[], reportId: (body.reportId as number) ?? null, summary: body.summary as FindingSummary | undefined };
  }
  if (status === 0) return { type: 'error', message };
  if (status === 409 && typeof body.datasetId === 'number') return { type: 'duplicate', message, datasetId: body.datasetId };
  return { type: 'error', message };
}

export function UploadForm({ supersedable }: { supersedable: { id: number; name: string }[] }) {
  const [kind, setKind] = useState<Kind>('cohort');
  const [file, setFile] = useState<File | null>(null);
  const [dragging, setDragging] = useState(false);
  const [progress, setProgress] = useState<number | null>(null);
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);

  function onDrop(e: DragEvent) {
    e.preventDefault();
    setDragging(false);
    const f = e.dataTransfer.files?.[0];
    if (f) setFile(f);
  }

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    if (!file) {
      setOutcome({ type: 'error', message: 'Choose or drop a CSV file first.' });
      return;
    }
    const data = new FormData(e.currentTarget);
    data.delete('file');
    for (const [k, v] of [...data.entries()]) if (v === '') data.delete(k);
    data.append('file', file, file.name);
    setOutcome(null);
    setProgress(0);
    const { status, body } = await uploadDatasetFile(data, setProgress);
    setProgress(null);
    setOutcome(toOutcome(status, body));
    if (status === 201 || status === 202) {
      // A new dataset: clear the chosen file so that the same bytes are not sent twice by mistake.
      setFile(null);
      if (inputRef.current) inputRef.current.value = '';
    }
  }

  return (
    <div className="space-y-5">
      <form onSubmit={onSubmit} className="panel space-y-4 p-5" aria-label="Upload a dataset">
        <fieldset>
          <legend className="label">Kind of file</legend>
          <div className="grid gap-2 md:grid-cols-3">
            {kinds.map((k) => (
              <label
                key={k.value}
                className={`block cursor-pointer rounded border p-3 text-sm ${kind === k.value ? 'border-[var(--color-accent)] bg-[var(--color-accent-soft)]' : 'border-[var(--color-line)]'}`}
              >
                <span className="flex items-center gap-2 font-medium">
                  <input type="radio" name="kind" value={k.value} checked={kind === k.value} onChange={() => setKind(k.value)} />
                  {k.label}
                </span>
                <span className="mt-1 block text-xs text-[var(--color-muted)]">{k.columns}</span>
                {k.samples.map((sample) => (
                  <a key={sample.href} href={sample.href} download className="mt-1 block text-xs">
                    {sample.label}
                  </a>
                ))}
              </label>
            ))}
          </div>
        </fieldset>

        <div
          onDragOver={(e) => {
            e.preventDefault();
            setDragging(true);
          }}
          onDragLeave={() => setDragging(false)}
          onDrop={onDrop}
          data-testid="drop-zone"
          className={`rounded border-2 border-dashed p-6 text-center focus-within:border-[var(--color-accent)] focus-within:ring-2 focus-within:ring-[var(--color-accent)] ${dragging ? 'border-[var(--color-accent)] bg-[var(--color-accent-soft)]' : 'border-[var(--color-line)]'}`}
        >
          <p className="text-sm">Drop a CSV file here (UTF-8, comma or semicolon), or</p>
          <label htmlFor="upload-file" className="btn btn-quiet mt-2 cursor-pointer">
            Choose a file
          </label>
          <input
            ref={inputRef}
            id="upload-file"
            name="file"
            type="file"
            accept=".csv,text/csv"
            className="sr-only"
            onChange={(e) => setFile(e.target.files?.[0] ?? null)}
          />
          <p className="mt-2 text-sm" aria-live="polite" data-testid="chosen-file">
            {file ? `${file.name} (${formatSize(file.size)})` : 'No file chosen.'}
          </p>
        </div>

        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <label className="label" htmlFor="upload-name">Name (default: the file name)</label>
            <input id="upload-name" name="name" maxLength={160} className="field" />
          </div>
          <div>
            <label className="label" htmlFor="upload-supersedes">Replaces (supersedes) an earlier dataset</label>
            <select id="upload-supersedes" name="supersedes" className="field" defaultValue="">
              <option value="">None</option>
              {supersedable.map((d) => (
                <option key={d.id} value={d.id}>
                  No. {d.id}: {d.name}
                </option>
              ))}
            </select>
          </div>
          <div className="md:col-span-2">
            <label className="label" htmlFor="upload-description">Description (source, default definition, anything a reviewer should know)</label>
            <textarea id="upload-description" name="description" maxLength={2000} rows={2} className="field" />
          </div>
          {kind === 'loans' ? (
            <>
              <div>
                <label className="label" htmlFor="upload-asof">As-of date (default: the latest date in the file)</label>
                <input id="upload-asof" name="asOf" type="date" className="field" />
              </div>
              <div>
                <label className="label" htmlFor="upload-ref">Reference date of each year (MM-DD)</label>
                <input id="upload-ref" name="referenceMonthDay" placeholder="01-01" pattern="\d{2}-\d{2}" className="field" />
              </div>
              <div className="md:col-span-2">
                <label className="label" htmlFor="upload-exits">Loans that exit without default during a year</label>
                <select id="upload-exits" name="exitConvention" className="field" defaultValue="exits-stay">
                  <option value="exits-stay">stay in that year&apos;s cohort (declared default)</option>
                  <option value="exits-removed">are removed from that year&apos;s cohort</option>
                </select>
              </div>
            </>
          ) : null}
        </div>

        <div className="flex items-center gap-4">
          <button type="submit" className="btn" disabled={progress !== null}>
            {progress === null ? 'Upload and validate' : progress < 1 ? 'Uploading…' : 'Checking…'}
          </button>
          {progress !== null ? (
            <div className="flex flex-1 items-center gap-3" role="status">
              <span className="w-44 text-sm text-[var(--color-muted)]">
                {progress < 1 ? (
                  <>
                    Sending <span className="num">{Math.round(progress * 100)}%</span>
                  </>
                ) : kind === 'loans' ? (
                  'Sent; storing the tape…'
                ) : (
                  'Sent; checking every row…'
                )}
              </span>
              <ProgressBar value={progress < 1 ? progress : null} label="Upload progress" />
            </div>
          ) : null}
        </div>
        <p className="text-xs text-[var(--color-muted)]">
          The same file uploaded twice is recognised by its SHA-256 and refused, naming the dataset it already is. A dataset is
          never edited: to correct one, upload the corrected file and choose the dataset it replaces.
        </p>
      </form>

      {outcome ? <OutcomeView outcome={outcome} /> : null}
    </div>
  );
}

function OutcomeView({ outcome }: { outcome: Outcome }) {
  switch (outcome.type) {
    case 'accepted':
      return (
        <section className="space-y-3" aria-label="Upload result">
          <p className="notice-good" role="status">
            Accepted: {outcome.rows} cohort rows in {outcome.segments.length} segment{outcome.segments.length === 1 ? '' : 's'}.{' '}
            <Link className="font-medium underline" href={`/data/${outcome.id}`}>Open the dataset</Link>
            {outcome.warnings.length > 0 ? ' to review or waive its warnings.' : '.'}
          </p>
          {outcome.warnings.length > 0 ? <ReportTable issues={outcome.warnings} caption="Warnings of the accepted file" /> : null}
        </section>
      );
    case 'queued':
      return <QueuedView id={outcome.id} reportId={outcome.reportId} />;
    case 'rejected':
      return <RejectedView message={outcome.message} issues={outcome.issues} reportId={outcome.reportId} summary={outcome.summary} />;
    case 'duplicate':
      return (
        <p className="notice-caution" role="alert">
          {outcome.message} <Link href={`/data/${outcome.datasetId}`}>Open dataset no. {outcome.datasetId}</Link>.
        </p>
      );
    default:
      return (
        <p className="notice-bad" role="alert">
          {outcome.message}
        </p>
      );
  }
}

function RejectedView({ message, issues, reportId, summary }: { message: string; issues: UploadIssue[]; reportId: number | null; summary?: FindingSummary }) {
  return (
    <section className="space-y-3" aria-label="Validation report">
      <p className="notice-bad" role="alert">
        {message}
      </p>
      <div className="panel space-y-3 p-5">
        <div className="flex items-center justify-between">
          <h2>Validation report</h2>
          {reportId !== null ? (
            <a className="btn btn-quiet text-sm" href={`/api/datasets/reports/${reportId}/report.csv`} download>
              Download the report (CSV)
            </a>
          ) : null}
        </div>
        <ReportTable issues={issues} caption="Validation report" summary={summary} />
      </div>
    </section>
  );
}

function QueuedView({ id, reportId }: { id: number; reportId: number }) {
  const { data: report } = useQuery(uploadReportQuery(reportId));
  if (report?.status === 'rejected') {
    const n = report.errorCount;
    return (
      <RejectedView
        message={`The loan tape was not accepted: ${n.toLocaleString('en-GB')} error${n === 1 ? '' : 's'}. Nothing was stored except this report; fix the rows listed below and upload the file again.`}
        issues={report.issues}
        reportId={reportId}
        summary={report.summary}
      />
    );
  }
  if (report?.status === 'accepted') {
    return (
      <p className="notice-good" role="status">
        Converted: the loan tape is now a dataset of annual cohorts{report.warningCount > 0 ? ` with ${report.warningCount} warning${report.warningCount === 1 ? '' : 's'}` : ''}.{' '}
        <Link className="font-medium underline" href={`/data/${id}`}>
          Open the dataset
        </Link>
        .
      </p>
    );
  }
  if (report?.status === 'failed') {
    return (
      <p className="notice-bad" role="alert">
        {report.message ?? 'The conversion did not finish.'} <Link href={`/data/${id}`}>Dataset no. {id}</Link>
      </p>
    );
  }
  const job = report?.job ?? null;
  const waiting = !job || job.status === 'queued';
  return (
    <div className="panel space-y-2 p-4" role="status">
      <p>
        Stored as dataset no. {id}. The worker checks every row and counts the annual cohorts; you can leave this page, the
        dataset list shows the progress too.
      </p>
      <div className="flex items-center gap-3">
        <ProgressBar value={waiting ? null : job.progress / 100} label="Conversion progress" />
        <span className="num w-12 text-right text-sm">{waiting ? '' : `${job.progress}%`}</span>
      </div>
      <p className="text-sm text-[var(--color-muted)]">{waiting ? 'Waiting for a worker…' : job.message ?? ''}</p>
    </div>
  );
}
