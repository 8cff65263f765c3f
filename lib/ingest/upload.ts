/**
 * What an upload is and how it is validated: the pure middle of the upload path. The route
 * receives the file (lib/http/multipart.ts: hashed and compressed while it arrives), this module
 * validates it, and the data access layer stores the outcome in one transaction
 * (lib/dal/datasets.ts and lib/dal/dataset-store.ts).
 *
 * - cohort and vintage files are validated completely at upload (vintages converted to annual
 *   cohorts on the way);
 * - a loan tape is checked at upload only as far as its header and first row; the convert-loans job
 *   validates every row and aggregates it later (convertLoanTape).
 */
import { createHash } from 'node:crypto';
import { mapColumns } from './columns';
import { readCsvStream, type ByteSource, type CsvSink, type ReadOptions } from './csv-reader';
import { validateCohortStream, type CohortRow } from './cohort';
import { FindingCollector, type Finding, type FindingSummary } from './findings';
import { LOAN_COLUMNS, validateLoanTapeStream, type LoanTapeOptions } from './loan-tape';
import { validateVintageStream, type CensoredVintageYear } from './vintage';

export type UploadKind = 'cohort' | 'vintage' | 'loans';

/** An uploaded file as received: its name, size and hash, and its bytes gzip-compressed. */
export type UploadedFile = {
  /** file name given by the client (base name only, at most 255 characters) */
  fileName: string;
  sizeBytes: number;
  sha256: string;
  /** the file gzip-compressed, read from its start at every call */
  gzip(): AsyncIterable<Uint8Array>;
};

/** The conventions a loan tape is converted with (chosen at upload). */
export type LoanOptions = Pick<LoanTapeOptions, 'asOf' | 'referenceMonthDay' | 'exitConvention'>;

/** Conventions recorded with a dataset (shown on its page and in its cohorts CSV). */
export type DatasetConventions = {
  /** the plain-language rule, as written by the converter */
  text: string;
  referenceMonthDay?: string;
  exitConvention?: string;
  asOf?: string | null;
  asOfSource?: string;
  firstPeriod?: string | null;
  lastPeriod?: string | null;
};

export const COHORT_CONVENTION_TEXT =
  'Cohort counts as uploaded: obligors performing at the start of each annual period, defaults during it (one-year horizon). No conversion.';

/** The outcome of validating a file: findings, and when it passed, the annual cohort rows to store. */
export type Validated = {
  ok: boolean;
  findings: Finding[];
  summary: FindingSummary;
  cohortRows: CohortRow[];
  conventions: DatasetConventions;
  censored: CensoredVintageYear[];
};

/** What the upload-time check of a loan tape found (its header and first row). */
export type HeaderCheck = { ok: boolean; findings: Finding[]; summary: FindingSummary };

/**
 * The identity used to recognise the same upload twice: the file's hash plus everything that
 * changes what is made of it (kind; for loan tapes the as-of date, reference date and exit
 * convention). The same bytes with another convention are a different dataset.
 */
export function dedupeKeyOf(upload: { kind: UploadKind; sha256: string; loanOptions?: LoanOptions }): string {
  const o = upload.kind === 'loans' ? upload.loanOptions ?? {} : {};
  const options = upload.kind === 'loans' ? `${o.asOf ?? ''}|${o.referenceMonthDay ?? '01-01'}|${o.exitConvention ?? 'exits-stay'}` : '';
  return createHash('sha256').update(`${upload.sha256}|${upload.kind}|${options}`).digest('hex');
}

/** Validates a cohort or vintage file completely (the conversion of vintages included). */
export async function validateCohortOrVintage(kind: 'cohort' | 'vintage', source: ByteSource, limits: ReadOptions): Promise<Validated> {
  if (kind === 'cohort') {
    const v = await validateCohortStream(source, limits);
    return { ok: v.ok, findings: v.findings, summary: v.summary, cohortRows: v.rows, conventions: { text: COHORT_CONVENTION_TEXT }, censored: [] };
  }
  const v = await validateVintageStream(source, limits);
  return { ok: v.ok, findings: v.findings, summary: v.summary, cohortRows: v.cohortRows, conventions: { text: v.convention }, censored: v.censored };
}

/**
 * Checks what can be checked of a loan tape without reading it whole: encoding, delimiter, the
 * header and the first data row's width. Row-level rules are applied by the conversion job.
 */
export async function checkLoanTapeHeader(source: ByteSource, limits: ReadOptions): Promise<HeaderCheck> {
  const findings = new FindingCollector();
  const sink: CsvSink = {
    header: (names, line) => mapColumns(names, LOAN_COLUMNS, line, findings, 'loan-level') !== null,
    row: () => undefined,
  };
  // The reader stops after the first data row (not by cutting the bytes: a cut would leave a
  // partial line that reads as a row with too few fields).
  await readCsvStream(source, sink, findings, { ...limits, maxDataRows: 1 });
  return { ok: findings.errors === 0, findings: findings.sorted(), summary: findings.summary() };
}

/** Validates every row of a loan tape and aggregates it by the cohort method (the conversion job). */
export async function convertLoanTape(source: ByteSource, options: LoanTapeOptions): Promise<Validated> {
  const v = await validateLoanTapeStream(source, options);
  return {
    ok: v.ok,
    findings: v.findings,
    summary: v.summary,
    cohortRows: v.cohortRows,
    conventions: { text: v.conventionText, ...v.conventions },
    censored: [],
  };
}
