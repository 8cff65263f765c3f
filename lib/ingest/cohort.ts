/**
 * Cohort uploads: `segment, period, obligors, defaults` (+ optional `default_definition`, `note`,
 * `grade`), one row per segment and period (DESIGN.md, "Data the user brings").
 *
 * Decisions documented here:
 * - Periods are calendar years written YYYY (1900-2100). YYYY-MM and YYYY-Qn are refused with
 *   `period-not-annual`: every estimator and every number derived from rho in Rhobook uses a
 *   one-year default horizon, and monthly or quarterly default rates would silently mean another
 *   horizon. Monthly data should be uploaded as a vintage file or a loan tape, which Rhobook
 *   converts to annual cohorts by a stated rule.
 * - Unknown columns are warnings (ignored, not stored), see `mapColumns`.
 * - Rows with errors are left out of `rows`; the upload is accepted only when there are no errors.
 * - An optional `grade` column splits a segment into rating grades: a row with a grade belongs to
 *   the panel `SEGMENT / GRADE` (GRADE_SEPARATOR), which is stored, listed and fitted as a segment
 *   of its own, so the grades of one portfolio can be fitted together under one factor (the grade
 *   model). A row with an empty grade stays in the segment itself.
 */
import { z } from 'zod';
import { cohortTooLarge } from '@/lib/stats/cohort-limit';
import { FindingCollector, type Finding, type FindingSummary } from './findings';
import { readCsvStream, readCsvText, type ByteSource, type ReadInfo, type ReadOptions } from './csv-reader';
import { KindSink } from './kind-sink';
import { checkText, countOrReport } from './values';
import { checkPanel } from './panel-checks';
import { checkDefaultDefinitions } from './default-definition';
import { MAX_SEGMENT_CHARS } from './limits';

export const cohortRowSchema = z
  .object({
    segment: z.string().min(1).max(MAX_SEGMENT_CHARS),
    period: z.string().regex(/^\d{4}$/),
    obligors: z.number().int().positive(),
    defaults: z.number().int().nonnegative(),
    /** physical line in the uploaded file; null for rows converted from vintages or loans */
    line: z.number().int().positive().nullable(),
    defaultDefinition: z.string().optional(),
    note: z.string().optional(),
  })
  .refine((r) => r.defaults <= r.obligors, { message: 'defaults must not exceed obligors', path: ['defaults'] });
export type CohortRow = z.infer<typeof cohortRowSchema>;

export const COHORT_COLUMNS = {
  required: ['segment', 'period', 'obligors', 'defaults'] as const,
  optional: ['default_definition', 'note', 'grade'] as const,
};

/** Between a segment and its grade in the name of a graded panel: `Corporate loans / BB`. */
export const GRADE_SEPARATOR = ' / ';

export interface CohortValidation {
  kind: 'cohort';
  /** true when there is no error */
  ok: boolean;
  /** rows that passed every row-level check, in file order */
  rows: CohortRow[];
  /** stored findings, by line */
  findings: Finding[];
  summary: FindingSummary;
  file: ReadInfo;
}

export const MIN_YEAR = 1900;
export const MAX_YEAR = 2100;

/** Parses an annual period; reports and returns null otherwise. */
export function checkPeriod(raw: string, line: number, findings: FindingCollector): string | null {
  const s = raw.trim();
  if (/^\d{4}$/.test(s)) {
    const y = Number(s);
    if (y >= MIN_YEAR && y <= MAX_YEAR) return s;
    findings.error('period-out-of-range', line, 'period', raw, `The period ${s} is outside ${MIN_YEAR}-${MAX_YEAR}. Check the year.`);
    return null;
  }
  if (/^\d{4}-(0[1-9]|1[0-2])$/.test(s) || /^\d{4}[- ]?[Qq][1-4]$/.test(s) || /^\d{4}-?[Hh][12]$/.test(s)) {
    findings.error(
      'period-not-annual',
      line,
      'period',
      raw,
      `The period "${s}" is monthly, quarterly or half-yearly. Cohort files hold annual periods written YYYY (for example 2015), because rho is fitted to one-year default rates. Aggregate to years, or upload monthly data as a vintage file or a loan-level tape.`,
    );
    return null;
  }
  findings.error(
    'period-unparseable',
    line,
    'period',
    raw,
    `The period "${s}" is not a year. Write periods as four-digit years, for example 2015.`,
  );
  return null;
}

class CohortSink extends KindSink<'segment' | 'period' | 'obligors' | 'defaults', 'default_definition' | 'note' | 'grade'> {
  rows: CohortRow[] = [];
  private readonly seen = new Map<string, number>();

  constructor(findings: FindingCollector) {
    super(findings, COHORT_COLUMNS, 'cohort');
  }

  row(fields: string[], line: number): void {
    const c = this.cols!;
    const f = this.findings;
    const errorsBefore = f.errors;
    const grade = c.grade !== undefined ? fields[c.grade].trim() : '';
    const segment = this.segments.check(grade === '' || fields[c.segment].trim() === '' ? fields[c.segment] : `${fields[c.segment].trim()}${GRADE_SEPARATOR}${grade}`, line);
    const period = checkPeriod(fields[c.period], line, f);
    const obligors = countOrReport(fields[c.obligors], 'obligors', 'obligors', line, this.delimiter, f);
    const defaults = countOrReport(fields[c.defaults], 'defaults', 'defaults', line, this.delimiter, f);
    const tooLarge = obligors === null ? null : cohortTooLarge(obligors);
    if (tooLarge !== null) f.error('cohort-too-large', line, 'obligors', String(obligors), tooLarge);
    if (obligors === 0) {
      f.error('obligors-not-positive', line, 'obligors', '0', 'Obligors is 0. A cohort needs at least one obligor performing at the start of the period; remove the row or correct the count.');
    }
    if (obligors !== null && defaults !== null && defaults > obligors) {
      f.error(
        'defaults-exceed-obligors',
        line,
        'defaults',
        String(defaults),
        `Defaults (${defaults}) exceed obligors (${obligors}). Defaults are counted among the obligors performing at the start of the period, so they cannot be more; check both columns.`,
      );
    }
    const defaultDefinition = c.default_definition !== undefined ? checkText(fields[c.default_definition], 'default_definition', line, f) : undefined;
    const note = c.note !== undefined ? checkText(fields[c.note], 'note', line, f) : undefined;
    if (segment !== null && period !== null) {
      const key = segment + '\u0000' + period;
      const firstLine = this.seen.get(key);
      if (firstLine !== undefined) {
        f.error(
          'duplicate-period',
          line,
          'period',
          period,
          `Segment "${segment}" has period ${period} twice (lines ${firstLine} and ${line}). Keep one row per segment and period.`,
        );
      } else {
        this.seen.set(key, line);
      }
    }
    if (f.errors !== errorsBefore) return;
    const candidate = {
      segment: segment!,
      period: period!,
      obligors: obligors!,
      defaults: defaults!,
      line,
      ...(defaultDefinition ? { defaultDefinition } : {}),
      ...(note ? { note } : {}),
    };
    const parsed = cohortRowSchema.safeParse(candidate);
    if (!parsed.success) {
      // Unreachable when the checks above are complete; kept so a gap in them cannot pass bad rows.
      f.error('invalid-row', line, null, null, `Line ${line} is not a valid cohort row: ${parsed.error.issues.map((i) => i.message).join('; ')}.`);
      return;
    }
    this.rows.push(parsed.data);
  }
}

function finish(sink: CohortSink, findings: FindingCollector, file: ReadInfo): CohortValidation {
  if (findings.errors === 0) {
    checkPanel(sink.rows, findings, 'file');
    checkDefaultDefinitions(sink.rows, findings);
  }
  return { kind: 'cohort', ok: findings.errors === 0, rows: sink.rows, findings: findings.sorted(), summary: findings.summary(), file };
}

/**
 * Validates a cohort file held in memory. Pass bytes (Uint8Array/Buffer) to have the encoding
 * checked too.
 *
 * @example validateCohortText('segment,period,obligors,defaults\nSME,2015,1200,14\n').rows[0].defaults // 14
 */
export function validateCohortText(text: string | Uint8Array, options: ReadOptions = {}): CohortValidation {
  const findings = new FindingCollector();
  const sink = new CohortSink(findings);
  const file = readCsvText(text, sink, findings, options);
  return finish(sink, findings, file);
}

/** Streaming equivalent of `validateCohortText`. */
export async function validateCohortStream(source: ByteSource, options: ReadOptions = {}): Promise<CohortValidation> {
  const findings = new FindingCollector();
  const sink = new CohortSink(findings);
  const file = await readCsvStream(source, sink, findings, options);
  return finish(sink, findings, file);
}
