/**
 * Demo data for the invented lender Fenmoor Cooperative Bank. Every number here is invented and
 * generated from the Vasicek one-factor model with the parameters below; no real institution's
 * data is used.
 *
 * Segments and true parameters (annual PD p, asset correlation rho), chosen to look like the
 * usual ordering of retail and SME books (mortgages highly correlated but rarely defaulting,
 * cards and personal loans granular and weakly correlated):
 *
 * | segment                     | p      | rho  | obligors, first year | growth / yr | cohorts   |
 * |-----------------------------|--------|------|----------------------|-------------|-----------|
 * | SME term loans              | 0.025  | 0.12 | 1,800                | 3 %         | 2003-2024 |
 * | Owner-occupied mortgages    | 0.008  | 0.15 | 24,000               | 4 %         | 2000-2024 |
 * | Prime auto loans            | 0.012  | 0.06 | 9,000                | 5 %         | 2008-2024 |
 * | Unsecured personal loans    | 0.035  | 0.05 | 6,000                | 2 %         | 2005-2024 |
 * | Credit cards                | 0.040  | 0.04 | 20,000               | 6 %         | 2010-2024 |
 *
 * Every generator is deterministic given its seed (the seeded generator of lib/stats/random.ts).
 */
import { normalCdf, normalQuantile } from '@/lib/stats/normal';

/** The random generator the demo needs (lib/stats/random.ts `createRng(seed)` provides it). */
export interface DemoRng {
  uniform(): number;
  normal(): number;
  binomial(n: number, p: number): number;
}

export interface DemoSegment {
  name: string;
  pd: number;
  rho: number;
  obligors: number;
  growth: number;
  firstYear: number;
  lastYear: number;
}

export const LENDER_NAME = 'Fenmoor Cooperative Bank';
export const DEMO_SEED = 20240611;
export const DEMO_LAST_YEAR = 2024;

export const FENMOOR_SEGMENTS: readonly DemoSegment[] = [
  { name: 'SME term loans', pd: 0.025, rho: 0.12, obligors: 1800, growth: 0.03, firstYear: 2003, lastYear: 2024 },
  { name: 'Owner-occupied mortgages', pd: 0.008, rho: 0.15, obligors: 24000, growth: 0.04, firstYear: 2000, lastYear: 2024 },
  { name: 'Prime auto loans', pd: 0.012, rho: 0.06, obligors: 9000, growth: 0.05, firstYear: 2008, lastYear: 2024 },
  { name: 'Unsecured personal loans', pd: 0.035, rho: 0.05, obligors: 6000, growth: 0.02, firstYear: 2005, lastYear: 2024 },
  { name: 'Credit cards', pd: 0.04, rho: 0.04, obligors: 20000, growth: 0.06, firstYear: 2010, lastYear: 2024 },
];

/** Vasicek conditional PD given the systematic factor x: Phi((Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho)). */
export function conditionalPd(pd: number, rho: number, x: number): number {
  return normalCdf((normalQuantile(pd) - Math.sqrt(rho) * x) / Math.sqrt(1 - rho));
}

/**
 * Systematic factors by calendar year for each segment, drawn once so that the cohort, vintage and
 * loan generators can share one "economy" when given the same rng state.
 */
export function drawFactors(segments: readonly DemoSegment[], rng: DemoRng, firstYear: number, lastYear: number): Map<string, Map<number, number>> {
  const out = new Map<string, Map<number, number>>();
  for (const s of segments) {
    const byYear = new Map<number, number>();
    for (let y = firstYear; y <= lastYear; y++) byYear.set(y, rng.normal());
    out.set(s.name, byYear);
  }
  return out;
}

export interface DemoCohortRow {
  segment: string;
  period: number;
  obligors: number;
  defaults: number;
  /** the systematic factor drawn for that year (kept for tests; not written to the CSV) */
  factor: number;
}

/**
 * The cohort panel: obligors grow by the segment's rate with +-5 % noise; defaults are
 * Binomial(obligors, conditionalPd(p, rho, x_t)) with x_t standard normal, i.e. the Vasicek model.
 */
export function generateCohortRows(rng: DemoRng, segments: readonly DemoSegment[] = FENMOOR_SEGMENTS): DemoCohortRow[] {
  const rows: DemoCohortRow[] = [];
  for (const s of segments) {
    for (let y = s.firstYear; y <= s.lastYear; y++) {
      const trend = s.obligors * Math.pow(1 + s.growth, y - s.firstYear);
      const obligors = Math.max(1, Math.round(trend * (0.95 + 0.1 * rng.uniform())));
      const factor = rng.normal();
      const defaults = rng.binomial(obligors, conditionalPd(s.pd, s.rho, factor));
      rows.push({ segment: s.name, period: y, obligors, defaults, factor });
    }
  }
  return rows;
}

export function cohortRowsCsv(rows: readonly DemoCohortRow[], note?: (r: DemoCohortRow) => string | undefined): string {
  const lines = [note ? 'segment,period,obligors,defaults,default_definition,note' : 'segment,period,obligors,defaults'];
  for (const r of rows) {
    if (note) lines.push(`${r.segment},${r.period},${r.obligors},${r.defaults},90 days past due or unlikely to pay,${note(r) ?? ''}`);
    else lines.push(`${r.segment},${r.period},${r.obligors},${r.defaults}`);
  }
  return lines.join('\n') + '\n';
}

export interface DemoVintageOptions {
  /** segments to generate vintages for; default prime auto and unsecured personal loans */
  segments?: readonly DemoSegment[];
  firstVintage?: string;
  lastVintage?: string;
  /** last calendar month observed, YYYY-MM */
  observedTo?: string;
  /** loans originated per vintage (before noise) */
  loansPerVintage?: number;
  /** term in months: a vintage is followed for at most this many months on book */
  term?: number;
  /** monthly prepayment probability */
  prepayment?: number;
}

/**
 * A vintage panel: each month's defaults are Binomial(active, h_Y) with the monthly hazard
 * h_Y = 1 - (1 - P(x_Y))^(1/12) of the calendar year Y (Vasicek conditional PD, one factor per
 * year shared by all vintages), then Binomial(survivors, prepayment) loans prepay.
 */
export function generateVintageCsv(rng: DemoRng, options: DemoVintageOptions = {}): string {
  const segments = options.segments ?? FENMOOR_SEGMENTS.filter((s) => s.name === 'Prime auto loans' || s.name === 'Unsecured personal loans');
  const first = options.firstVintage ?? '2015-01';
  const last = options.lastVintage ?? '2023-12';
  const observedTo = options.observedTo ?? '2024-12';
  const perVintage = options.loansPerVintage ?? 400;
  const term = options.term ?? 60;
  const prepay = options.prepayment ?? 0.012;
  const idx = (ym: string) => Number(ym.slice(0, 4)) * 12 + Number(ym.slice(5, 7)) - 1;
  const lines = ['segment,vintage,months_on_book,active,defaults'];
  for (const s of segments) {
    const factors = new Map<number, number>();
    for (let y = Math.floor(idx(first) / 12); y <= Math.floor(idx(observedTo) / 12); y++) factors.set(y, rng.normal());
    const hazard = new Map<number, number>();
    for (const [y, x] of factors) hazard.set(y, 1 - Math.pow(1 - conditionalPd(s.pd, s.rho, x), 1 / 12));
    for (let v = idx(first); v <= idx(last); v++) {
      const vintage = `${Math.floor(v / 12)}-${String((v % 12) + 1).padStart(2, '0')}`;
      let active = Math.round(perVintage * (0.8 + 0.4 * rng.uniform()));
      for (let m = 1; m <= term && v + m <= idx(observedTo); m++) {
        const year = Math.floor((v + m) / 12);
        const defaults = rng.binomial(active, hazard.get(year)!);
        lines.push(`${s.name},${vintage},${m},${active},${defaults}`);
        const survivors = active - defaults;
        active = survivors - rng.binomial(survivors, prepay);
      }
    }
  }
  return lines.join('\n') + '\n';
}
