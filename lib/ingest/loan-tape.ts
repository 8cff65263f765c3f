/**
 * Loan-level tapes: `loan_id, segment, start_date, default_date, exit_date` (ISO dates; the last
 * two empty when not reached), validated and aggregated to annual cohort rows in one streaming
 * pass by the cohort method (DESIGN.md, "Data the user brings"):
 *
 * - Reference dates R are a fixed month-day (default 1 January) of every year; period Y is the
 *   twelve months [R_Y, R_{Y+1}).
 * - A loan belongs to the cohort of R when start_date < R, it has not defaulted before R
 *   (default_date >= R or none) and has not exited before R (exit_date >= R or none).
 * - It counts as a default of that cohort when R <= default_date < R + 12 months.
 * - Exits, the usual choice `exits-stay`: a loan that exits without default during the year stays
 *   in the denominator. Alternative `exits-removed`: such a loan is removed from that year's cohort
 *   (it still counts in earlier years). The convention used is returned with the result.
 * - As-of date: given, or else the latest date in the file. Year Y is included only when
 *   as-of >= the last day of its twelve months (31 December Y with the default reference date).
 *
 * Because membership runs over a range of consecutive years, each loan adds +1 to its first cohort
 * and -1 after its last (a difference array per segment), so a loan costs O(1) whatever its length.
 *
 * Errors: empty loan_id or segment, duplicate loan_id, a date that is not a strict calendar date
 * YYYY-MM-DD, a date outside 1900-2199, a default or an exit before the start. Warnings: a date
 * after the given as-of date, a default after the exit. Memory: the set of loan ids (StringSet: about 2 bytes
 * per character + 30 bytes per loan) plus a few hundred counters per segment; rows are never kept.
 */
import { FindingCollector, type Finding, type FindingSummary } from './findings';
import { mapColumns } from './columns';
import { readCsvStream, readCsvText, type ByteSource, type CsvSink, type ReadInfo, type ReadOptions } from './csv-reader';
import { checkSegment } from './values';
import { checkPanel } from './panel-checks';
import { MAX_TEXT_CHARS } from './limits';
import { StringSet } from './string-set';
import {
  DATE_BAD_FORMAT,
  DATE_MAX_YEAR,
  DATE_MIN_YEAR,
  DATE_NOT_IN_CALENDAR,
  formatDate,
  nextDay,
  parseIsoDate,
  previousDay,
} from './dates';
import type { CohortRow } from './cohort';

export type ExitConvention = 'exits-stay' | 'exits-removed';

export interface LoanTapeOptions extends ReadOptions {
  /** As-of date of the tape, YYYY-MM-DD; default: the latest date in the file. */
  asOf?: string;
  /** Reference month and day, MM-DD; default '01-01'. 02-29 is refused (not every year has it). */
  referenceMonthDay?: string;
  /** Treatment of loans that exit without default during a year; default 'exits-stay'. */
  exitConvention?: ExitConvention;
}

export const LOAN_COLUMNS = {
  required: ['loan_id', 'segment', 'start_date', 'default_date', 'exit_date'] as const,
  optional: [] as const,
};

export interface LoanTapeConventions {
  referenceMonthDay: string;
  exitConvention: ExitConvention;
  asOf: string | null;
  asOfSource: 'given' | 'latest-date-in-file';
  /** first and last included period, null when none */
  firstPeriod: string | null;
  lastPeriod: string | null;
}

export interface LoanTapeCounts {
  /** data rows read */
  rows: number;
  /** rows accepted as loans */
  loans: number;
  /** rows rejected for an error */
  rejectedRows: number;
  /** accepted loans with a default date / an exit date */
  defaults: number;
  exits: number;
  segments: number;
}

export interface LoanTapeValidation {
  kind: 'loans';
  ok: boolean;
  cohortRows: CohortRow[];
  counts: LoanTapeCounts;
  /** accepted loans and defaults by segment */
  segments: { segment: string; loans: number; defaults: number }[];
  conventions: LoanTapeConventions;
  conventionText: string;
  findings: Finding[];
  summary: FindingSummary;
  file: ReadInfo;
}

const YEARS = DATE_MAX_YEAR - DATE_MIN_YEAR + 3;
const NONE = 0;
const OPEN = 1 << 30;

interface SegmentState {
  name: string;
  /** obligor difference array by year index (year - DATE_MIN_YEAR) */
  diff: Int32Array;
  defaults: Int32Array;
  loans: number;
  defaultsTotal: number;
}

const MONTH_NAMES = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

function describeMonthDay(mmdd: number): string {
  return `${mmdd % 100} ${MONTH_NAMES[Math.floor(mmdd / 100) - 1]}`;
}

function trimmed(s: string): string {
  return s.length > 0 && (s.charCodeAt(0) <= 32 || s.charCodeAt(s.length - 1) <= 32) ? s.trim() : s;
}

class LoanSink implements CsvSink {
  private cols: ReturnType<typeof mapColumns<'loan_id' | 'segment' | 'start_date' | 'default_date' | 'exit_date', never>> = null;
  private iId = 0;
  private iSeg = 1;
  private iStart = 2;
  private iDefault = 3;
  private iExit = 4;
  readonly ids = new StringSet(1 << 16);
  /** raw segment cell -> state (null when the name is unusable) */
  private readonly byRaw = new Map<string, SegmentState | null>();
  /** the previous row's raw segment and state: tapes are usually grouped by segment */
  private lastRaw = '';
  private lastState: SegmentState | null = null;
  readonly byName = new Map<string, SegmentState>();
  rows = 0;
  loans = 0;
  defaults = 0;
  exits = 0;
  maxDate = 0;

  constructor(
    private readonly findings: FindingCollector,
    private readonly ref: number,
    private readonly asOfGiven: number,
    private readonly removeExits: boolean,
  ) {}

  header(names: string[], line: number): boolean {
    this.cols = mapColumns(names, LOAN_COLUMNS, line, this.findings, 'loan-level');
    if (this.cols === null) return false;
    this.iId = this.cols.loan_id;
    this.iSeg = this.cols.segment;
    this.iStart = this.cols.start_date;
    this.iDefault = this.cols.default_date;
    this.iExit = this.cols.exit_date;
    return true;
  }

  private segmentState(raw: string, line: number): SegmentState | null {
    if (raw === this.lastRaw && this.lastState !== null) return this.lastState;
    const state = this.lookupSegment(raw, line);
    this.lastRaw = raw;
    this.lastState = state;
    return state;
  }

  private lookupSegment(raw: string, line: number): SegmentState | null {
    const known = this.byRaw.get(raw);
    if (known !== undefined) {
      if (known === null) checkSegment(raw, line, this.findings, false); // report the error on every row
      return known;
    }
    const name = checkSegment(raw, line, this.findings, true);
    let state: SegmentState | null = null;
    if (name !== null) {
      state = this.byName.get(name) ?? null;
      if (state === null) {
        // Copy the name so the map does not keep the parser's chunk alive.
        const own = name.split('').join('');
        state = { name: own, diff: new Int32Array(YEARS + 1), defaults: new Int32Array(YEARS + 1), loans: 0, defaultsTotal: 0 };
        this.byName.set(own, state);
      }
    }
    this.byRaw.set(raw.split('').join(''), state);
    return state;
  }

  private date(raw: string, column: string, line: number): number {
    const s = trimmed(raw);
    if (s.length === 0) return NONE;
    const v = parseIsoDate(s);
    if (v > 0) return v;
    if (v === DATE_BAD_FORMAT || v === DATE_NOT_IN_CALENDAR) {
      this.findings.error('date-unparseable', line, column, raw, () =>
        v === DATE_BAD_FORMAT
          ? `"${raw}" in ${column} is not a date written YYYY-MM-DD (for example 2016-03-31). Write dates in ISO form.`
          : `"${raw}" in ${column} is not a day of the calendar (check the month and the day, and 29 February in non-leap years).`,
      );
    } else {
      this.findings.error(
        'date-out-of-range',
        line,
        column,
        raw,
        `"${raw}" in ${column} is outside ${DATE_MIN_YEAR}-${DATE_MAX_YEAR}. Check the year.`,
      );
    }
    return -1;
  }

  row(fields: string[], line: number): void {
    this.rows++;
    const f = this.findings;
    const before = f.errors;
    const id = trimmed(fields[this.iId]);
    const state = this.segmentState(fields[this.iSeg], line);
    const rawStart = fields[this.iStart];
    let s = this.date(rawStart, 'start_date', line);
    if (s === NONE) {
      f.error('missing-value', line, 'start_date', '', 'The start date is empty. Every loan needs its start (origination or first observation) date, YYYY-MM-DD.');
      s = -1;
    }
    const d = this.date(fields[this.iDefault], 'default_date', line);
    const x = this.date(fields[this.iExit], 'exit_date', line);
    if (s > 0) {
      if (d > 0 && d < s) {
        f.error('default-before-start', line, 'default_date', fields[this.iDefault], () => `The default date ${formatDate(d)} is before the start date ${formatDate(s)}. Correct one of the dates.`);
      }
      if (x > 0 && x < s) {
        f.error('exit-before-start', line, 'exit_date', fields[this.iExit], () => `The exit date ${formatDate(x)} is before the start date ${formatDate(s)}. Correct one of the dates.`);
      }
    }
    if (id.length === 0) {
      f.error('missing-value', line, 'loan_id', fields[this.iId], 'The loan_id is empty. Give every loan a unique identifier.');
    } else if (id.length > MAX_TEXT_CHARS) {
      f.error('text-too-long', line, 'loan_id', id, `The loan_id has ${id.length} characters; the limit is ${MAX_TEXT_CHARS}.`);
    } else {
      if (!this.ids.add(id)) {
        f.error('duplicate-loan-id', line, 'loan_id', id, () => `The loan_id "${id}" appears earlier in the file. Each loan must appear once; remove the duplicate row or fix its identifier.`);
      }
    }
    if (f.errors !== before || state === null) return;

    if (d > 0 && x > 0 && d > x) {
      f.warning('default-after-exit', line, 'default_date', fields[this.iDefault], () => `The default date ${formatDate(d)} is after the exit date ${formatDate(x)}. A loan that has left the book is not followed further; the default counts only if it falls in the year of the exit. Check both dates.`);
    }
    if (this.asOfGiven > 0) {
      const late = s > this.asOfGiven ? 'start_date' : d > this.asOfGiven ? 'default_date' : x > this.asOfGiven ? 'exit_date' : null;
      if (late !== null) {
        const raw = late === 'start_date' ? rawStart : late === 'default_date' ? fields[this.iDefault] : fields[this.iExit];
        f.warning('date-after-as-of', line, late, raw, () => `The ${late} ${trimmed(raw)} is after the as-of date ${formatDate(this.asOfGiven)}. Events after the as-of date fall outside every counted cohort; check the date or the as-of date.`);
      }
    }
    if (s > this.maxDate) this.maxDate = s;
    if (d > this.maxDate) this.maxDate = d;
    if (x > this.maxDate) this.maxDate = x;

    this.loans++;
    state.loans++;
    if (x > 0) this.exits++;
    const ref = this.ref;
    // Year of the first reference date after the start: R_Y > s.
    const firstY = (s % 10000 < ref ? Math.floor(s / 10000) : Math.floor(s / 10000) + 1) - DATE_MIN_YEAR;
    // Year of the reference date on or before a date: R_Y <= date.
    const yd = d > 0 ? (d % 10000 >= ref ? Math.floor(d / 10000) : Math.floor(d / 10000) - 1) - DATE_MIN_YEAR : OPEN;
    let yx = x > 0 ? (x % 10000 >= ref ? Math.floor(x / 10000) : Math.floor(x / 10000) - 1) - DATE_MIN_YEAR : OPEN;
    if (this.removeExits && x > 0 && yd !== yx) yx -= 1; // exits without default in year yx leave that cohort
    const lastY = yd < yx ? yd : yx;
    if (d > 0) {
      this.defaults++;
      state.defaultsTotal++;
    }
    if (firstY <= lastY) {
      state.diff[firstY]++;
      if (lastY !== OPEN) state.diff[lastY + 1]--;
      if (d > 0 && yd <= lastY) state.defaults[yd]++;
    }
  }
}

function parseMonthDay(text: string): number {
  const m = /^(\d{2})-(\d{2})$/.exec(text);
  if (!m) return -1;
  const mm = Number(m[1]);
  const dd = Number(m[2]);
  if (mm < 1 || mm > 12 || dd < 1 || dd > [0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][mm]) return -1;
  return mm * 100 + dd;
}

interface Prepared {
  findings: FindingCollector;
  sink: LoanSink;
  ref: number;
  asOfGiven: number;
  exitConvention: ExitConvention;
}

function prepare(options: LoanTapeOptions): Prepared {
  const findings = new FindingCollector();
  let ref = 101;
  if (options.referenceMonthDay !== undefined) {
    const r = parseMonthDay(options.referenceMonthDay);
    if (r < 0) {
      findings.error(
        'reference-date-invalid',
        null,
        'reference_month_day',
        options.referenceMonthDay,
        `The reference date "${options.referenceMonthDay}" is not a month and day written MM-DD that exists every year (for example 01-01 or 07-01; not 02-29).`,
      );
    } else ref = r;
  }
  let asOfGiven = 0;
  if (options.asOf !== undefined && options.asOf !== '') {
    const a = parseIsoDate(options.asOf.trim());
    if (a < 0) {
      findings.error('as-of-invalid', null, 'as_of', options.asOf, `The as-of date "${options.asOf}" is not a calendar date written YYYY-MM-DD. Give the date up to which the tape is complete.`);
    } else asOfGiven = a;
  }
  const exitConvention = options.exitConvention ?? 'exits-stay';
  return { findings, sink: new LoanSink(findings, ref, asOfGiven, exitConvention === 'exits-removed'), ref, asOfGiven, exitConvention };
}

function finish(p: Prepared, file: ReadInfo): LoanTapeValidation {
  const { findings, sink, ref } = p;
  const asOf = p.asOfGiven > 0 ? p.asOfGiven : sink.maxDate;
  // Year Y counts when as-of >= R_{Y+1} - 1 day, i.e. when the reference year of (as-of + 1 day) >= Y + 1.
  let lastIncluded = -1;
  if (asOf > 0) {
    const after = nextDay(asOf);
    lastIncluded = (after % 10000 >= ref ? Math.floor(after / 10000) : Math.floor(after / 10000) - 1) - 1 - DATE_MIN_YEAR;
  }
  const cohortRows: CohortRow[] = [];
  const names = [...sink.byName.keys()].sort();
  for (const name of names) {
    const st = sink.byName.get(name)!;
    let obligors = 0;
    for (let yi = 0; yi <= Math.min(lastIncluded, YEARS - 1); yi++) {
      obligors += st.diff[yi];
      if (obligors > 0) {
        cohortRows.push({ segment: st.name, period: String(yi + DATE_MIN_YEAR), obligors, defaults: st.defaults[yi], line: null });
      }
    }
  }
  const periods = cohortRows.map((r) => Number(r.period));
  const firstPeriod = periods.length ? String(Math.min(...periods)) : null;
  const lastPeriod = periods.length ? String(Math.max(...periods)) : null;
  if (findings.errors === 0 && sink.loans > 0 && cohortRows.length === 0) {
    findings.error(
      'no-complete-cohort',
      null,
      null,
      asOf > 0 ? formatDate(asOf) : null,
      `No cohort year is complete: no loan was performing at a reference date whose twelve months end on or before the as-of date ${asOf > 0 ? formatDate(asOf) : ''}. Check the dates or the as-of date.`,
    );
  }
  if (findings.errors === 0) checkPanel(cohortRows, findings, 'converted');
  const refText = describeMonthDay(ref);
  const mmdd = `${String(Math.floor(ref / 100)).padStart(2, '0')}-${String(ref % 100).padStart(2, '0')}`;
  const asOfText = asOf > 0 ? formatDate(asOf) : 'none (no valid date in the file)';
  const lastYearEnd = lastPeriod !== null ? formatDate(previousDay((Number(lastPeriod) + 1) * 10000 + ref)) : null;
  const conventionText = [
    `Loan tape aggregated by the cohort method with reference date ${refText} of each year (period Y = the twelve months from Y-${mmdd}).`,
    'A loan belongs to the cohort of reference date R when start_date < R and it has neither defaulted nor exited before R; it counts as a default of that cohort when R <= default_date < R + 12 months.',
    p.exitConvention === 'exits-stay'
      ? 'A loan that exits without default during the year stays in that year\'s denominator (the usual convention).'
      : 'A loan that exits without default during the year is removed from that year\'s denominator (alternative convention).',
    `As-of date ${asOfText} (${p.asOfGiven > 0 ? 'given at upload' : 'the latest date in the file'}); a year is included only when the as-of date is on or after the last day of its twelve months.`,
    firstPeriod !== null ? `Cohorts included: ${firstPeriod} to ${lastPeriod} (the last one ends ${lastYearEnd}).` : 'No cohort included.',
  ].join(' ');
  return {
    kind: 'loans',
    ok: findings.errors === 0,
    cohortRows: findings.errors === 0 ? cohortRows : [],
    counts: {
      rows: sink.rows,
      loans: sink.loans,
      rejectedRows: sink.rows - sink.loans,
      defaults: sink.defaults,
      exits: sink.exits,
      segments: sink.byName.size,
    },
    segments: names.map((n) => ({ segment: n, loans: sink.byName.get(n)!.loans, defaults: sink.byName.get(n)!.defaultsTotal })),
    conventions: {
      referenceMonthDay: mmdd,
      exitConvention: p.exitConvention,
      asOf: asOf > 0 ? formatDate(asOf) : null,
      asOfSource: p.asOfGiven > 0 ? 'given' : 'latest-date-in-file',
      firstPeriod,
      lastPeriod,
    },
    conventionText,
    findings: findings.sorted(),
    summary: findings.summary(),
    file,
  };
}

/** Validates and aggregates a loan tape held in memory (small tapes, tests, the CLI). */
export function validateLoanTapeText(text: string | Uint8Array, options: LoanTapeOptions = {}): LoanTapeValidation {
  const p = prepare(options);
  const file = readCsvText(text, p.sink, p.findings, options);
  return finish(p, file);
}

/** Validates and aggregates a loan tape from a stream, without keeping rows. */
export async function validateLoanTapeStream(source: ByteSource, options: LoanTapeOptions = {}): Promise<LoanTapeValidation> {
  const p = prepare(options);
  const file = await readCsvStream(source, p.sink, p.findings, options);
  return finish(p, file);
}
