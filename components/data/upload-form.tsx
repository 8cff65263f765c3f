'use client';

import { useQuery } from '@tanstack/react-query';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useEffect, useMemo, useState, type DragEvent } from 'react';
import { FieldError, FormField, FormMessage } from '@/components/forms/form-field';
import { useFieldErrors } from '@/components/forms/use-field-errors';
import { uploadDatasetFile, uploadReportQuery } from '@/lib/client/datasets';
import { count } from '@/lib/format';
import { problemOf, type FormFieldRef, type FormProblem } from '@/lib/forms/place-errors';
import type { FindingSummary, UploadIssue } from '@/lib/ingest/findings';
import { formatSize } from './format';
import { ProgressBar } from './progress-bar';
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
  | { type: 'accepted'; id: number }
  | { type: 'queued'; id: number; reportId: number }
  | { type: 'rejected'; message: string; issues: UploadIssue[]; reportId: number | null; summary?: FindingSummary }
  | { type: 'duplicate'; message: string; datasetId: number }
  | { type: 'error'; problem: FormProblem };

function toOutcome(status: number, body: Record<string, unknown>): Outcome {
  if (status === 201) return { type: 'accepted', id: body.id as number };
  if (status === 202) return { type: 'queued', id: body.id as number, reportId: body.reportId as number };
  const message = typeof body.message === 'string' ? body.message : `The server answered ${status}.`;
  if (status === 422 && body.code === 'invalid:upload') {
    return { type: 'rejected', message, issues: body.issues as UploadIssue[], reportId: (body.reportId as number) ?? null, summary: body.summary as FindingSummary | undefined };
  }
  if (status === 409 && typeof body.datasetId === 'number') return { type: 'duplicate', message, datasetId: body.datasetId };
  return { type: 'error', problem: problemOf({ ...body, message }) };
}

/** The request path of each field of the upload and the id of its element. */
const FIELDS: readonly FormFieldRef[] = [
  ['kind', 'kind-cohort'],
  ['file', 'upload-file'],
  ['name', 'upload-name'],
  ['supersedes', 'upload-supersedes'],
  ['description', 'upload-description'],
  ['asOf', 'upload-asof'],
  ['referenceMonthDay', 'upload-ref'],
  ['exitConvention', 'upload-exits'],
];

/**
 * The upload of a cohort, vintage or loan-tape file. An accepted cohort or vintage file opens its
 * dataset page with the data check report; a loan tape is followed here while the worker converts
 * it (a tape refused by the conversion leaves only its report, shown here), then opens its page.
 */
export function UploadForm({ supersedable }: { supersedable: { id: number; name: string }[] }) {
  const router = useRouter();
  const [kind, setKind] = useState<Kind>('cohort');
  const [file, setFile] = useState<File | null>(null);
  const [dragging, setDragging] = useState(false);
  const [progress, setProgress] = useState<number | null>(null);
  const [outcome, setOutcome] = useState<Outcome | null>(null);
  const problem = useMemo(() => (outcome?.type === 'error' ? outcome.problem : null), [outcome]);
  const { error, formMessage } = useFieldErrors(problem, FIELDS);

  function onDrop(e: DragEvent) {
    e.preventDefault();
    setDragging(false);
    const f = e.dataTransfer.files?.[0];
    if (f) setFile(f);
  }

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    if (!file) {
      setOutcome({ type: 'error', problem: { message: 'Choose or drop a CSV file first.', field: 'file' } });
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
    const next = toOutcome(status, body);
    // An accepted file goes on to its dataset page, its data check report shown first.
    if (next.type === 'accepted') router.push(`/data/${next.id}?uploaded=1`);
    setOutcome(next);
  }

  return (
    <div className="space-y-5">
      <form onSubmit={onSubmit} className="panel space-y-4 p-5" aria-label="Upload a dataset" noValidate>
        <fieldset aria-describedby={error('kind-cohort') ? 'kind-cohort-error' : undefined}>
          <legend className="label">Kind of file</legend>
          <div className="grid gap-2 md:grid-cols-3">
            {kinds.map((k) => (
              <label
                key={k.value}
                className={`block cursor-pointer rounded border p-3 text-sm ${kind === k.value ? 'border-[var(--color-accent)] bg-[var(--color-accent-soft)]' : 'border-[var(--color-line)]'}`}
              >
                <span className="flex items-center gap-2 font-medium">
                  <input id={`kind-${k.value}`} type="radio" name="kind" value={k.value} checked={kind === k.value} onChange={() => setKind(k.value)} />
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
          <FieldError id="kind-cohort" error={error('kind-cohort')} />
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
            id="upload-file"
            name="file"
            type="file"
            accept=".csv,text/csv"
            className="sr-only"
            aria-invalid={error('upload-file') ? true : undefined}
            aria-describedby={error('upload-file') ? 'upload-file-error' : undefined}
            onChange={(e) => setFile(e.target.files?.[0] ?? null)}
          />
          <p className="mt-2 text-sm" aria-live="polite" data-testid="chosen-file">
            {file ? `${file.name} (${formatSize(file.size)})` : 'No file chosen.'}
          </p>
          <FieldError id="upload-file" error={error('upload-file')} />
        </div>

        <div className="grid gap-3 md:grid-cols-2">
          <FormField id="upload-name" label="Name (default: the file name)" error={error('upload-name')}>
            {(a) => <input {...a} name="name" maxLength={160} className="field" />}
          </FormField>
          <FormField id="upload-supersedes" label="Replaces (supersedes) an earlier dataset" error={error('upload-supersedes')}>
            {(a) => (
              <select {...a} name="supersedes" className="field" defaultValue="">
                <option value="">None</option>
                {supersedable.map((d) => (
                  <option key={d.id} value={d.id}>
                    No. {d.id}: {d.name}
                  </option>
                ))}
              </select>
            )}
          </FormField>
          <FormField id="upload-default-definition" className="md:col-span-2" label={`Definition of default${kind === 'cohort' ? ' (for rows without a default_definition value)' : ''}`} hint="A correlation is valid only with the definition of default it was fitted on: it travels with the data to the fit, the assumption and the API." error={error('upload-default-definition')}>
            {(a) => <input {...a} name="defaultDefinition" maxLength={500} className="field" placeholder="for example: 90 days past due or unlikely to pay" />}
          </FormField>
          <FormField
            id="upload-description"
            className="md:col-span-2"
            label="Description (source, anything a reviewer should know)"
            error={error('upload-description')}
          >
            {(a) => <textarea {...a} name="description" maxLength={2000} rows={2} className="field" />}
          </FormField>
          {kind === 'loans' ? (
            <>
              <FormField id="upload-asof" label="As-of date (default: the latest date in the file)" error={error('upload-asof')}>
                {(a) => <input {...a} name="asOf" type="date" className="field" />}
              </FormField>
              <FormField id="upload-ref" label="Reference date of each year (MM-DD)" error={error('upload-ref')}>
                {(a) => <input {...a} name="referenceMonthDay" placeholder="01-01" className="field" />}
              </FormField>
              <FormField id="upload-exits" className="md:col-span-2" label="Loans that exit without default during a year" error={error('upload-exits')}>
                {(a) => (
                  <select {...a} name="exitConvention" className="field" defaultValue="exits-stay">
                    <option value="exits-stay">stay in that year&apos;s cohort (usual choice)</option>
                    <option value="exits-removed">are removed from that year&apos;s cohort</option>
                  </select>
                )}
              </FormField>
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
        <FormMessage message={formMessage} />
      </form>

      {outcome && outcome.type !== 'error' ? <OutcomeView outcome={outcome} /> : null}
    </div>
  );
}

function OutcomeView({ outcome }: { outcome: Exclude<Outcome, { type: 'error' }> }) {
  switch (outcome.type) {
    case 'accepted':
      return (
        <p className="notice-good" role="status">
          Accepted: opening <Link href={`/data/${outcome.id}?uploaded=1`}>the dataset and its data check report</Link>…
        </p>
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
  }
}

function RejectedView({ message, issues, reportId, summary }: { message: string; issues: UploadIssue[]; reportId: number | null; summary?: FindingSummary }) {
  return (
    <section className="space-y-3" aria-label="Data check report">
      <p className="notice-bad" role="alert">
        {message}
      </p>
      <div className="panel space-y-3 p-5">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2>Data check report</h2>
          {reportId !== null ? (
            <a className="btn btn-quiet text-sm" href={`/api/datasets/reports/${reportId}/report.csv`} download>
              Download the report (CSV)
            </a>
          ) : null}
        </div>
        <ReportTable issues={issues} caption="Data check report" summary={summary} />
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
        message={`The loan tape was not accepted: ${count(n, 'error')}. Nothing was stored except this report; fix the rows listed below and upload the file again.`}
        issues={report.issues}
        reportId={reportId}
        summary={report.summary}
      />
    );
  }
  if (report?.status === 'accepted') {
    return <Converted id={id} warnings={report.warningCount} />;
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

/** A converted loan tape: goes on to its dataset page with the data check report shown first. */
function Converted({ id, warnings }: { id: number; warnings: number }) {
  const router = useRouter();
  useEffect(() => {
    router.push(`/data/${id}?uploaded=1`);
  }, [id, router]);
  return (
    <p className="notice-good" role="status">
      Converted: the loan tape is now a dataset of annual cohorts with {count(warnings, 'warning')}.{' '}
      <Link className="font-medium underline" href={`/data/${id}?uploaded=1`}>
        Open the dataset
      </Link>
      .
    </p>
  );
}
