/**
 * Vintage uploads: `segment, vintage, months_on_book, active, defaults` (DESIGN.md, "Data the
 * user brings"), and their conversion to annual cohort rows.
 *
 * `vintage` is the origination month YYYY-MM. Month on book 1 is the first calendar month after
 * the origination month, so month on book m of vintage (vy, vm) is calendar month vm + m of year
 * vy (carrying into later years). `active` counts loans performing at the start of that month on
 * book, `defaults` the defaults during it.
 *
 * Conversion (DESIGN.md rule): the cohort of year Y holds, from every vintage originated before
 * 1 January Y, the loans active in January of Y (obligors) and their defaults during the twelve
 * months of Y (defaults). January of Y is month on book mJ = 12 (Y - vy) + 1 - vm; the year's
 * defaults are those of months on book mJ .. mJ + 11. A vintage whose observation does not cover
 * all twelve months of Y (it ends before December, or starts after January) is left out of Y and
 * listed as censored. Only years that the vintage's observation touches are considered, so a
 * vintage is never listed for years long after its last row.
 */
import { z } from 'zod';
import { cohortTooLarge } from '@/lib/stats/cohort-limit';
import { FindingCollector, type Finding, type FindingSummary } from './findings';
import { readCsvStream, readCsvText, type ByteSource, type ReadInfo, type ReadOptions } from './csv-reader';
import { KindSink } from './kind-sink';
import { countOrReport } from './values';
import { checkPanel } from './panel-checks';
import { MAX_SEGMENT_CHARS } from './limits';
import { type CohortRow } from './cohort';

export const vintageRowSchema = z
  .object({
    segment: z.string().min(1).max(MAX_SEGMENT_CHARS),
    vintage: z.string().regex(/^\d{4}-(0[1-9]|1[0-2])$/),
    monthsOnBook: z.number().int().min(1),
    active: z.number().int().nonnegative(),
    defaults: z.number().int().nonnegative(),
    line: z.number().int().positive().nullable(),
  })
  .refine((r) => r.defaults <= r.active, { message: 'defaults must not exceed active', path: ['defaults'] });
export type VintageRow = z.infer<typeof vintageRowSchema>;

export const VINTAGE_COLUMNS = {
  required: ['segment', 'vintage', 'months_on_book', 'active', 'defaults'] as const,
  optional: [] as const,
};

export interface CensoredVintageYear {
  segment: string;
  vintage: string;
  year: number;
  reason: string;
}

export interface VintageConversion {
  cohortRows: CohortRow[];
  censored: CensoredVintageYear[];
  convention: string;
}

export interface VintageValidation extends VintageConversion {
  kind: 'vintage';
  ok: boolean;
  rows: VintageRow[];
  findings: Finding[];
  summary: FindingSummary;
  file: ReadInfo;
}

export const VINTAGE_CONVENTION =
  'Vintages converted to annual cohorts by observation year (12-month horizon): the cohort of year Y holds, from every vintage originated before 1 January Y, ' +
  'the loans active at the start of January of Y (month on book 12 x (Y - origination year) + 1 - origination month) as obligors, and their defaults in the twelve months on book ' +
  'from January to December of Y as defaults. A vintage not observed for all twelve months of Y is left out of Y and listed as censored.';

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** Calendar month (YYYY-MM) of month on book `mob` of vintage `vintage`. */
export function calendarMonthOf(vintage: string, mob: number): string {
  const vy = Number(vintage.slice(0, 4));
  const vm = Number(vintage.slice(5, 7));
  const index = vy * 12 + (vm - 1) + mob;
  const y = Math.floor(index / 12);
  const m = (index % 12) + 1;
  return `${y}-${String(m).padStart(2, '0')}`;
}

/** Month on book that falls in January of `year` for a vintage (may be < 1 when the vintage is younger). */
export function januaryMonthOnBook(vintage: string, year: number): number {
  const vy = Number(vintage.slice(0, 4));
  const vm = Number(vintage.slice(5, 7));
  return 12 * (year - vy) + 1 - vm;
}

/**
 * Converts vintage rows to annual cohort rows by the DESIGN.md rule (see the file comment).
 * Rows are assumed valid (see `validateVintageText`); a missing month inside a year censors that
 * year rather than guessing. Cohort rows with no obligors are not emitted.
 */
export function convertVintagesToCohorts(rows: readonly VintageRow[]): VintageConversion {
  const byVintage = new Map<string, { segment: string; vintage: string; months: Map<number, VintageRow> }>();
  for (const r of rows) {
    const key = r.segment + '\u0000' + r.vintage;
    let v = byVintage.get(key);
    if (!v) byVintage.set(key, (v = { segment: r.segment, vintage: r.vintage, months: new Map() }));
    v.months.set(r.monthsOnBook, r);
  }
  const totals = new Map<string, { segment: string; year: number; obligors: number; defaults: number }>();
  const censored: CensoredVintageYear[] = [];
  for (const v of byVintage.values()) {
    const mobs = [...v.months.keys()].sort((a, b) => a - b);
    const first = mobs[0];
    const last = mobs[mobs.length - 1];
    const vy = Number(v.vintage.slice(0, 4));
    for (let year = vy + 1; ; year++) {
      const mJ = januaryMonthOnBook(v.vintage, year);
      if (mJ > last) break;
      if (mJ + 11 < first) continue;
      let reason: string | null = null;
      if (mJ < first) {
        reason = `observation starts at month on book ${first} (${calendarMonthOf(v.vintage, first)}), after January ${year}`;
      } else if (mJ + 11 > last) {
        reason = `observation ends at month on book ${last} (${calendarMonthOf(v.vintage, last)}), before December ${year}`;
      } else {
        for (let m = mJ; m <= mJ + 11; m++) {
          if (!v.months.has(m)) {
            reason = `month on book ${m} (${calendarMonthOf(v.vintage, m)}) is missing`;
            break;
          }
        }
      }
      if (reason !== null) {
        censored.push({ segment: v.segment, vintage: v.vintage, year, reason });
        continue;
      }
      let defaults = 0;
      for (let m = mJ; m <= mJ + 11; m++) defaults += v.months.get(m)!.defaults;
      const key = v.segment + '\u0000' + year;
      let t = totals.get(key);
      if (!t) totals.set(key, (t = { segment: v.segment, year, obligors: 0, defaults: 0 }));
      t.obligors += v.months.get(mJ)!.active;
      t.defaults += defaults;
    }
  }
  const cohortRows: CohortRow[] = [...totals.values()]
    .filter((t) => t.obligors > 0)
    .sort((a, b) => (a.segment < b.segment ? -1 : a.segment > b.segment ? 1 : a.year - b.year))
    .map((t) => ({ segment: t.segment, period: String(t.year), obligors: t.obligors, defaults: t.defaults, line: null }));
  censored.sort((a, b) => (a.segment < b.segment ? -1 : a.segment > b.segment ? 1 : a.year - b.year || (a.vintage < b.vintage ? -1 : 1)));
  const convention = `${VINTAGE_CONVENTION} ${censored.length} vintage-year${censored.length === 1 ? ' was' : 's were'} censored.`;
  return { cohortRows, censored, convention };
}

class VintageSink extends KindSink<'segment' | 'vintage' | 'months_on_book' | 'active' | 'defaults', never> {
  rows: VintageRow[] = [];
  private readonly seen = new Map<string, number>();

  constructor(findings: FindingCollector) {
    super(findings, VINTAGE_COLUMNS, 'vintage');
  }

  row(fields: string[], line: number): void {
    const c = this.cols!;
    const f = this.findings;
    const before = f.errors;
    const segment = this.segments.check(fields[c.segment], line);
    const vintage = checkVintage(fields[c.vintage], line, f);
    const mob = countOrReport(fields[c.months_on_book], 'months on book', 'months_on_book', line, this.delimiter, f);
    if (mob === 0) {
      f.error(
        'months-on-book-invalid',
        line,
        'months_on_book',
        '0',
        'Months on book is 0. Month on book 1 is the first calendar month after the origination month; number the months from 1.',
      );
    }
    const active = countOrReport(fields[c.active], 'active loans', 'active', line, this.delimiter, f);
    const defaults = countOrReport(fields[c.defaults], 'defaults', 'defaults', line, this.delimiter, f);
    const tooLarge = active === null ? null : cohortTooLarge(active, 'active');
    if (tooLarge !== null) f.error('cohort-too-large', line, 'active', String(active), tooLarge);
    if (active !== null && defaults !== null && defaults > active) {
      f.error(
        'defaults-exceed-active',
        line,
        'defaults',
        String(defaults),
        `Defaults (${defaults}) exceed active loans (${active}). Defaults in a month are counted among the loans active at its start; check both columns.`,
      );
    }
    if (segment !== null && vintage !== null && mob !== null && mob > 0) {
      const key = `${segment}\u0000${vintage}\u0000${mob}`;
      const firstLine = this.seen.get(key);
      if (firstLine !== undefined) {
        f.error(
          'duplicate-month',
          line,
          'months_on_book',
          String(mob),
          `Segment "${segment}", vintage ${vintage}, month on book ${mob} appears twice (lines ${firstLine} and ${line}). Keep one row per segment, vintage and month on book.`,
        );
      } else {
        this.seen.set(key, line);
      }
    }
    if (f.errors !== before) return;
    const parsed = vintageRowSchema.safeParse({ segment, vintage, monthsOnBook: mob, active, defaults, line });
    if (!parsed.success) {
      f.error('invalid-row', line, null, null, `Line ${line} is not a valid vintage row: ${parsed.error.issues.map((i) => i.message).join('; ')}.`);
      return;
    }
    this.rows.push(parsed.data);
  }

  /** Whole-vintage checks: gaps in months on book (error), active counts that grow (warning). */
  finishChecks(): void {
    const groups = new Map<string, VintageRow[]>();
    for (const r of this.rows) {
      const key = r.segment + '\u0000' + r.vintage;
      let g = groups.get(key);
      if (!g) groups.set(key, (g = []));
      g.push(r);
    }
    for (const g of groups.values()) {
      g.sort((a, b) => a.monthsOnBook - b.monthsOnBook);
      for (let i = 1; i < g.length; i++) {
        const a = g[i - 1];
        const b = g[i];
        if (b.monthsOnBook !== a.monthsOnBook + 1) {
          this.findings.error(
            'months-on-book-gap',
            b.line,
            'months_on_book',
            String(b.monthsOnBook),
            `Segment "${b.segment}", vintage ${b.vintage} jumps from month on book ${a.monthsOnBook} to ${b.monthsOnBook}. Add the missing month${b.monthsOnBook - a.monthsOnBook > 2 ? 's' : ''}: default counts cannot be summed over a year with holes.`,
          );
        } else if (b.active > a.active - a.defaults) {
          this.findings.warning(
            'active-increases',
            b.line,
            'active',
            String(b.active),
            `Segment "${b.segment}", vintage ${b.vintage}: ${b.active} loans are active at month on book ${b.monthsOnBook}, more than the ${a.active - a.defaults} left after month ${a.monthsOnBook} (${a.active} active, ${a.defaults} defaults). A vintage cannot gain loans; check the counts.`,
          );
        }
      }
    }
  }
}

function checkVintage(raw: string, line: number, findings: FindingCollector): string | null {
  const s = raw.trim();
  const m = /^(\d{4})-(\d{2})$/.exec(s);
  if (m && Number(m[2]) >= 1 && Number(m[2]) <= 12 && Number(m[1]) >= 1900 && Number(m[1]) <= 2100) return s;
  findings.error(
    'vintage-unparseable',
    line,
    'vintage',
    raw,
    `The vintage "${s}" is not an origination month. Write it as YYYY-MM, for example 2016-03 (${MONTHS[2]} 2016).`,
  );
  return null;
}

/**
 * A file (error) or a segment (warning) whose vintages give no complete observation year would
 * otherwise be stored as an empty dataset or vanish without a word.
 */
function noCompleteYear(rows: readonly VintageRow[], converted: readonly CohortRow[], findings: FindingCollector): void {
  const rule = 'Each year needs, from vintages originated before it, all twelve months from January to December on record.';
  if (converted.length === 0) {
    findings.error(
      'no-complete-cohort',
      null,
      null,
      null,
      `No annual cohort can be formed: no vintage is observed for a full calendar year after the year it was originated. ${rule} Add the later months on book, or upload the data as cohort counts.`,
    );
    return;
  }
  const withRows = new Set(converted.map((r) => r.segment));
  const firstLine = new Map<string, number | null>();
  for (const r of rows) if (!firstLine.has(r.segment)) firstLine.set(r.segment, r.line);
  for (const [segment, line] of firstLine) {
    if (withRows.has(segment)) continue;
    findings.warning(
      'segment-without-cohorts',
      line,
      'segment',
      segment,
      `Segment "${segment}" gives no annual cohort: none of its vintages is observed for a full calendar year after the year it was originated, so it is left out of the dataset. ${rule}`,
    );
  }
}

function finish(sink: VintageSink, findings: FindingCollector, file: ReadInfo): VintageValidation {
  if (findings.errors === 0) sink.finishChecks();
  let conversion: VintageConversion = { cohortRows: [], censored: [], convention: VINTAGE_CONVENTION };
  if (findings.errors === 0) {
    conversion = convertVintagesToCohorts(sink.rows);
    const good: CohortRow[] = [];
    for (const r of conversion.cohortRows) {
      if (r.defaults > r.obligors) {
        findings.error(
          'converted-defaults-exceed-obligors',
          null,
          'defaults',
          String(r.defaults),
          `Converted cohort ${r.period} of segment "${r.segment}" would have ${r.defaults} defaults among ${r.obligors} obligors. The active counts are inconsistent with the defaults; check the rows flagged active-increases.`,
        );
      } else {
        good.push(r);
      }
    }
    conversion.cohortRows = good;
    if (sink.rows.length > 0) noCompleteYear(sink.rows, good, findings);
    checkPanel(good, findings, 'converted');
  }
  return { kind: 'vintage', ok: findings.errors === 0, rows: sink.rows, ...conversion, findings: findings.sorted(), summary: findings.summary(), file };
}

/** Validates a vintage file held in memory and converts it to annual cohort rows. */
export function validateVintageText(text: string | Uint8Array, options: ReadOptions = {}): VintageValidation {
  const findings = new FindingCollector();
  const sink = new VintageSink(findings);
  const file = readCsvText(text, sink, findings, options);
  return finish(sink, findings, file);
}

/** Streaming equivalent of `validateVintageText` (the vintage rows themselves are kept: they are needed for the conversion). */
export async function validateVintageStream(source: ByteSource, options: ReadOptions = {}): Promise<VintageValidation> {
  const findings = new FindingCollector();
  const sink = new VintageSink(findings);
  const file = await readCsvStream(source, sink, findings, options);
  return finish(sink, findings, file);
}
