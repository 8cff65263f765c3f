/**
 * CSV exports of validation reports and cohort rows, written by the app's one CSV writer
 * (lib/csv.ts: RFC 4180 quoting, formula cells neutralised, comment lines kept whole).
 */
import { toCsv } from '@/lib/csv';
import type { Finding } from './findings';

export const FINDINGS_CSV_HEADER = ['line', 'column', 'rule', 'severity', 'value', 'message'] as const;

/** A validation report as CSV: one finding per row, in the order given. */
export function findingsToCsv(findings: readonly Finding[]): string {
  return toCsv(
    FINDINGS_CSV_HEADER,
    findings.map((f) => [f.line, f.column, f.rule, f.severity, f.value, f.message]),
  );
}

export const COHORT_CSV_HEADER = ['segment', 'period', 'obligors', 'defaults'] as const;

/**
 * Cohort rows as `segment,period,obligors,defaults`. `comments` (provenance, conventions, censored
 * list) are written first as lines starting with "# " so that a reader can check a conversion by
 * hand; pass none for a plain file.
 */
export function cohortRowsToCsv(
  rows: readonly { segment: string; period: string; obligors: number; defaults: number }[],
  comments: readonly string[] = [],
): string {
  return toCsv(
    COHORT_CSV_HEADER,
    rows.map((r) => [r.segment, r.period, r.obligors, r.defaults]),
    { comments },
  );
}
