/**
 * A loan-level tape for the demo lender, generated so that its cohorts (by the cohort method with
 * 1 January reference dates, exits staying in the denominator) follow the Vasicek model:
 *
 * - each segment has one standard normal factor x_Y per calendar year Y, shared by its loans;
 * - a loan is performing at 1 January of every year after its start until it defaults or exits;
 *   in each such year Y it defaults with probability P(x_Y) = Phi((Phi^-1(p) - sqrt(rho) x_Y) /
 *   sqrt(1 - rho)) (default date uniform in the year); otherwise it exits (repays, matures) with a
 *   fixed annual probability (exit date uniform in the year); loans have no events between their
 *   start and their first 1 January;
 * - so, given x_Y, the defaults of cohort Y are Binomial(n_Y, P(x_Y)): exactly the model.
 *
 * Start dates: a quarter of each segment's loans are the book migrated when the lender's system
 * started (start dates in the year before the segment's first cohort), the rest are spread
 * uniformly up to the as-of date; this keeps the first cohorts from being tiny.
 *
 * The tape is produced as CSV text in chunks (a generator), so a million loans never exist as
 * objects at once.
 */
import { conditionalPd, FENMOOR_SEGMENTS, type DemoRng, type DemoSegment } from './fenmoor';

export interface LoanTapeDemoOptions {
  loans?: number;
  segments?: readonly DemoSegment[];
  /** share of loans by segment, same order as segments; default by segment size */
  weights?: readonly number[];
  /** last day covered by the tape, YYYY-12-31 */
  asOfYear?: number;
  /** annual probability of exit without default */
  exitRate?: number;
  /** characters per yielded chunk (approximate) */
  chunkChars?: number;
}

const MS_PER_DAY = 86_400_000;

/** ISO strings for day numbers (days since 1970-01-01), built once per range. */
function dayTable(fromYear: number, toYear: number): { first: number; iso: string[] } {
  const first = Date.UTC(fromYear, 0, 1) / MS_PER_DAY;
  const last = Date.UTC(toYear, 11, 31) / MS_PER_DAY;
  const iso: string[] = [];
  for (let d = first; d <= last; d++) iso.push(new Date(d * MS_PER_DAY).toISOString().slice(0, 10));
  return { first, iso };
}

/** Yields the tape `loan_id,segment,start_date,default_date,exit_date` in chunks of CSV text. */
export function* generateLoanTape(rng: DemoRng, options: LoanTapeDemoOptions = {}): Generator<string> {
  const segments = options.segments ?? FENMOOR_SEGMENTS;
  const total = options.loans ?? 200_000;
  const asOfYear = options.asOfYear ?? 2024;
  const exitRate = options.exitRate ?? 0.12;
  const chunkChars = options.chunkChars ?? 256 * 1024;
  const weights = options.weights ?? segments.map((s) => s.obligors);
  const wsum = weights.reduce((a, b) => a + b, 0);
  const earliest = Math.min(...segments.map((s) => s.firstYear)) - 1;
  const days = dayTable(earliest, asOfYear);
  const dayOf = (y: number, m: number, d: number) => Date.UTC(y, m, d) / MS_PER_DAY;
  const asOfDay = dayOf(asOfYear, 11, 31);
  const pad = String(total).length;

  let buffer = 'loan_id,segment,start_date,default_date,exit_date\n';
  let id = 0;
  for (let si = 0; si < segments.length; si++) {
    const s = segments[si];
    const count = si === segments.length - 1 ? total - id : Math.round((total * weights[si]) / wsum);
    // One factor per cohort year, and its conditional PD.
    const pdByYear = new Float64Array(asOfYear + 2);
    for (let y = s.firstYear; y <= asOfYear; y++) pdByYear[y] = conditionalPd(s.pd, s.rho, rng.normal());
    const migrationStart = dayOf(s.firstYear - 1, 0, 1);
    const flowStart = dayOf(s.firstYear, 0, 1);
    for (let i = 0; i < count; i++) {
      id++;
      const migrated = rng.uniform() < 0.25;
      const start = migrated
        ? migrationStart + Math.floor(rng.uniform() * (flowStart - migrationStart))
        : flowStart + Math.floor(rng.uniform() * (asOfDay - flowStart + 1));
      const startYear = Number(days.iso[start - days.first].slice(0, 4));
      let defaultDay = -1;
      let exitDay = -1;
      for (let y = startYear + 1; y <= asOfYear; y++) {
        const yearStart = dayOf(y, 0, 1);
        const yearDays = dayOf(y + 1, 0, 1) - yearStart;
        if (rng.uniform() < pdByYear[y]) {
          defaultDay = yearStart + Math.floor(rng.uniform() * yearDays);
          break;
        }
        if (rng.uniform() < exitRate) {
          exitDay = yearStart + Math.floor(rng.uniform() * yearDays);
          break;
        }
      }
      buffer +=
        'FCB-' +
        String(id).padStart(pad, '0') +
        ',' +
        s.name +
        ',' +
        days.iso[start - days.first] +
        ',' +
        (defaultDay >= 0 ? days.iso[defaultDay - days.first] : '') +
        ',' +
        (exitDay >= 0 ? days.iso[exitDay - days.first] : '') +
        '\n';
      if (buffer.length >= chunkChars) {
        yield buffer;
        buffer = '';
      }
    }
  }
  if (buffer.length > 0) yield buffer;
}
