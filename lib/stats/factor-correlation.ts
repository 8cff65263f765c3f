/**
 * The correlation between two segments' systematic factors (DESIGN.md "Between segments"): each
 * segment's (p, rho) is its own binomialMle on the pair's common window, then the factor
 * correlation r by maximum likelihood with its likelihood-ratio interval, and the quick moment
 * version from the implied factor series beside it.
 */
import { brentRoot } from './brent';
import { binomialMle } from './estimators/binomial-mle';
import type { EstimateStatus } from './estimators/types';
import { chiSquare1Quantile } from './intervals/profile';
import { normalQuantile } from './normal';
import { PairLikelihood } from './pair-likelihood';
import type { Panel } from './panel';
import { safeguardedNewtonRoot } from './safeguarded-newton';

/** One segment of a pair: its name and yearly counts. */
export interface PairSegmentInput {
  segment: string;
  periods: readonly string[];
  obligors: readonly number[];
  defaults: readonly number[];
}

/** Result of {@link factorCorrelation}: one entry of the `pairs` block. */
export interface FactorCorrelation {
  a: string;
  b: string;
  status: EstimateStatus;
  reason?: string;
  /** The common window (years both segments have). */
  periods: string[];
  /** Maximum-likelihood r (margins at their own estimates); null when not estimable. */
  r: number | null;
  /** Ends of the likelihood-ratio interval at `level`; an end at -1 or 1 is that bound. */
  lower: number | null;
  upper: number | null;
  level: number;
  /** Pearson correlation of the implied factor series; null when undefined (reason in momentReason). */
  moment: number | null;
  momentReason?: string;
  logLik: number | null;
  /** Each segment's own binomialMle on the common window. */
  margins: { a: { pd: number; rho: number } | null; b: { pd: number; rho: number } | null };
}

/** r beyond which the nested rule hands over to the boundary (r = +-1 is computed exactly). */
const R_LIMIT = 0.999;

/**
 * The implied factor x_t = (k - sqrt(1 - rho) Phi^-1(DR_t)) / sqrt(rho) of each year of a panel
 * at (p, rho) (DESIGN.md), or the reason it is undefined (a year with DR 0 or 1, or rho = 0).
 */
export function impliedFactorSeries(panel: Panel, pd: number, rho: number): { values: number[] } | { reason: string } {
  if (!(rho > 0)) return { reason: 'the segment has rho = 0, so it has no implied factor' };
  const k = normalQuantile(pd);
  const values: number[] = [];
  for (let t = 0; t < panel.obligors.length; t++) {
    const dr = panel.defaults[t] / panel.obligors[t];
    if (dr === 0 || dr === 1) return { reason: `year ${t + 1} has a default rate of ${dr}, where the implied factor is infinite` };
    values.push((k - Math.sqrt(1 - rho) * normalQuantile(dr)) / Math.sqrt(rho));
  }
  return { values };
}

/** Pearson's correlation of two equally long series, or null when either is constant. */
function pearson(x: readonly number[], y: readonly number[]): number | null {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  return sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : null;
}

/** A segment's (p, rho) on a pair's window, or the sentence saying why it has none. */
export type PairMargin = { pd: number; rho: number } | string;

/**
 * The margin of one segment of a pair: its own binomialMle on the pair's common window
 * (`periods`, the years of `panel`), or why it cannot enter a pair (no likelihood estimate, or
 * rho = 0). The same for every pair over that window, so a matrix computes it once.
 *
 * @example pairMargin('Retail', { obligors: [1000, 1050, 1100], defaults: [8, 12, 25] }, ['2021', '2022', '2023'])
 */
export function pairMargin(name: string, panel: Panel, periods: readonly string[]): PairMargin {
  const m = binomialMle(panel);
  if (m.rho === null || m.pd === null || m.status === 'not-converged') {
    return `${name} has no likelihood estimate on ${periods[0]}-${periods.at(-1)} (${m.reason ?? m.status}), so its factor cannot be correlated with another`;
  }
  if (m.rho === 0) return `${name}'s own correlation is 0 on ${periods[0]}-${periods.at(-1)}: its factor does not move its defaults, so no correlation with another factor can be seen`;
  return { pd: m.pd, rho: m.rho };
}

/** r clipped to [-R_LIMIT, R_LIMIT]. */
function clampCorrelation(r: number): number {
  return Math.max(-R_LIMIT, Math.min(R_LIMIT, r));
}

/**
 * The maximiser of l(r) on [-1, 1]: from the moment version (clipped to +-0.9, else 0) steps
 * toward the sign of the slope (0.25, or up to 0.5 when the secant of the slope puts its root
 * further) until the slope changes sign, then Brent's root of the slope (tolerance
 * 1e-7); a slope that keeps its sign to +-0.999 puts the maximum on the bound.
 */
function maximiseCorrelation(L: PairLikelihood, moment: number | null): { r: number; atBound: boolean; converged: boolean } {
  let r0 = moment === null ? 0 : Math.max(-0.9, Math.min(0.9, moment));
  let q0 = L.logLikWithSlope(r0);
  if (q0.slope === 0) return { r: r0, atBound: false, converged: true };
  const direction = q0.slope > 0 ? 1 : -1;
  let step = 0.25;
  for (;;) {
    const r1 = clampCorrelation(r0 + step * direction);
    const q1 = L.logLikWithSlope(r1);
    if (Math.sign(q1.slope) !== direction || q1.slope === 0) {
      const [lo, hi] = direction > 0 ? [r0, r1] : [r1, r0];
      const root = brentRoot((r) => L.logLikWithSlope(r).slope, lo, hi, { tolerance: 1e-7 });
      return { r: root.value, atBound: false, converged: root.converged };
    }
    if (Math.abs(r1) >= R_LIMIT) return { r: direction, atBound: true, converged: true };
    // The secant of the slope predicts its root; go a little beyond it.
    const shrinking = Math.abs(q1.slope) < Math.abs(q0.slope);
    const distance = shrinking ? Math.abs((q1.slope * (r1 - r0)) / (q0.slope - q1.slope)) : Number.POSITIVE_INFINITY;
    step = Math.min(0.5, Math.max(0.25, 1.5 * distance));
    r0 = r1;
    q0 = q1;
  }
}

/** Restricts two segments to the years both have, in increasing order. */
export function commonWindow(a: PairSegmentInput, b: PairSegmentInput): { periods: string[]; a: Panel; b: Panel } {
  const inB = new Map(b.periods.map((p, t) => [String(p), t]));
  const rows = a.periods.map((p, t) => ({ period: String(p), ta: t, tb: inB.get(String(p)) })).filter((r) => r.tb !== undefined);
  rows.sort((x, y) => (x.period < y.period ? -1 : x.period > y.period ? 1 : 0));
  return {
    periods: rows.map((r) => r.period),
    a: { obligors: rows.map((r) => a.obligors[r.ta]), defaults: rows.map((r) => a.defaults[r.ta]) },
    b: { obligors: rows.map((r) => b.obligors[r.tb!]), defaults: rows.map((r) => b.defaults[r.tb!]) },
  };
}

/**
 * Maximum-likelihood correlation of two segments' factors with its likelihood-ratio interval.
 *
 * Model: the years' factors (z1_t, z2_t) are bivariate standard normal with correlation r,
 * independent across years; each segment's defaults follow its own Vasicek one-factor model. The
 * margins are each segment's binomialMle on the common window (held fixed: a two-stage or IFM
 * estimate, Joe 2005), then r maximises l(r) (pair-likelihood.ts) on [-1, 1].
 *
 * Method: start at the moment version clipped to [-0.9, 0.9] (else 0); step toward the sign of
 * d l / d r by 0.25 to 0.5 (to +-0.999) until the slope changes sign; Brent's root of the slope in
 * that bracket (tolerance 1e-7). When the slope is still positive at 0.999 (negative at -0.999)
 * the maximum is on the boundary r = 1 (-1), reported as such. Interval: { r : l(r) >= l(r_hat) -
 * chi2_1(level) / 2 }; each end is first guessed from the quadratic approximation of l at r_hat
 * (its curvature from the slopes of the last steps), then found by safeguarded Newton with the
 * exact slope inside (-0.999, 0.999) and Brent's method between 0.999 and the exactly computed
 * end r = +-1; an end that reaches the bound is the bound. Every l(r) is evaluated once
 * (PairLikelihood remembers the last ones). The moment version is Pearson's correlation of the implied factor series
 * (DESIGN.md) at each segment's own estimate.
 *
 * Special cases (status `undefined` with a sentence, never NaN): fewer than 3 common years; a
 * segment whose binomialMle gives no value (no defaults in the common window, for example) or
 * rho = 0 (its factor does not move its defaults, so r is not identified). A likelihood that
 * cannot be evaluated gives `not-converged` with the reason.
 *
 * @example factorCorrelation(segmentA, segmentB, { level: 0.95 })
 *
 * Reference: Gordy, M. B. & Heitfield, E. (2002) (the margins); Joe, H. (2005), Journal of
 * Multivariate Analysis 94:401-419; Plackett, R. L. (1954), Biometrika 41:351-360.
 */
export function factorCorrelation(
  segmentA: PairSegmentInput,
  segmentB: PairSegmentInput,
  options: { level?: number; margins?: { a: PairMargin; b: PairMargin } } = {},
): FactorCorrelation {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`factorCorrelation: the level must be strictly between 0 and 1; got ${level}.`);
  const window = commonWindow(segmentA, segmentB);
  const base: FactorCorrelation = {
    a: segmentA.segment,
    b: segmentB.segment,
    status: 'undefined',
    periods: window.periods,
    r: null,
    lower: null,
    upper: null,
    level,
    moment: null,
    logLik: null,
    margins: { a: null, b: null },
  };
  if (window.periods.length < 3) {
    return { ...base, reason: `${segmentA.segment} and ${segmentB.segment} have ${window.periods.length} year${window.periods.length === 1 ? '' : 's'} in common; a factor correlation needs at least 3.` };
  }
  const ma = options.margins?.a ?? pairMargin(segmentA.segment, window.a, window.periods);
  const mb = options.margins?.b ?? pairMargin(segmentB.segment, window.b, window.periods);
  if (typeof ma === 'string' || typeof mb === 'string') {
    const reasons = [ma, mb].filter((x): x is string => typeof x === 'string');
    return {
      ...base,
      margins: { a: typeof ma === 'string' ? null : ma, b: typeof mb === 'string' ? null : mb },
      reason: `${reasons.join('; ')}.`,
    };
  }
  base.margins = { a: ma, b: mb };
  const fa = impliedFactorSeries(window.a, ma.pd, ma.rho);
  const fb = impliedFactorSeries(window.b, mb.pd, mb.rho);
  if ('values' in fa && 'values' in fb) {
    base.moment = pearson(fa.values, fb.values);
    if (base.moment === null) base.momentReason = 'an implied factor series is constant';
  } else {
    base.momentReason = `${'reason' in fa ? `${segmentA.segment}: ${fa.reason}` : `${segmentB.segment}: ${(fb as { reason: string }).reason}`}`;
  }
  try {
    const L = new PairLikelihood(window.a, window.b, ma, mb);
    const found = maximiseCorrelation(L, base.moment);
    let converged = found.converged;
    const rHat = found.r;
    const atBound = found.atBound;
    const logLik = L.logLik(rHat);
    const cut = logLik - chiSquare1Quantile(level) / 2;
    // The ends are searched in Fisher's z = atanh(r), where l is closer to a parabola; the
    // quadratic approximation of l at its maximum (curvature from the slopes of the last steps)
    // gives the first guess of each.
    const zHat = Math.atanh(rHat);
    const curvature = atBound ? Number.NaN : L.curvatureNear(rHat) * (1 - rHat * rHat) ** 2;
    const halfWidth = curvature < 0 ? Math.sqrt((2 * (logLik - cut)) / -curvature) : 0.2;
    const zLimit = Math.atanh(R_LIMIT);
    const end = (side: 1 | -1): number => {
      if (atBound && rHat === side) return side;
      const g = (z: number) => {
        const r = Math.tanh(z);
        const q = L.logLikWithSlope(r);
        return { f: q.value - cut, df: q.slope * (1 - r) * (1 + r) };
      };
      let inside = zHat;
      let fInside = logLik - cut;
      let z = Math.max(-zLimit, Math.min(zLimit, zHat + side * halfWidth));
      for (let attempt = 0; attempt < 60; attempt++) {
        const q = g(z);
        if (q.f < 0) {
          const [lo, hi, flo, fhi] = side > 0 ? [inside, z, fInside, q.f] : [z, inside, q.f, fInside];
          const root = safeguardedNewtonRoot(g, lo, hi, flo, fhi, { tolerance: 1e-7, start: z });
          converged &&= root.converged;
          return Math.tanh(root.value);
        }
        inside = z;
        fInside = q.f;
        if (Math.abs(z) >= zLimit) break;
        // Still above the cut: a Newton step, which on a concave l lands beyond the end.
        const newton = q.df * side < 0 ? -q.f / q.df : Number.POSITIVE_INFINITY;
        z = Math.max(-zLimit, Math.min(zLimit, z + side * Math.min(1, Math.max(0.05, Math.abs(newton)))));
      }
      const inR = Math.tanh(inside);
      // Above the cut-off at +-0.999: the end lies between there and the bound, or is the bound.
      const atEnd = L.logLik(side) - cut;
      if (atEnd >= 0) return side;
      const root = brentRoot((x) => L.logLik(x) - cut, Math.min(inR, side), Math.max(inR, side), { tolerance: 1e-9 });
      converged &&= root.converged;
      return root.value;
    };
    const lower = end(-1);
    const upper = end(1);
    return {
      ...base,
      status: converged ? (atBound ? 'clipped' : 'ok') : 'not-converged',
      ...(atBound ? { reason: `The likelihood is largest at the bound r = ${rHat}: the two factors move ${rHat > 0 ? 'together' : 'opposite'} as far as these data can tell.` } : {}),
      ...(!converged ? { reason: 'The maximisation or an interval search did not meet its tolerance; do not use this value.' } : {}),
      r: rHat,
      lower,
      upper,
      logLik,
    };
  } catch (err) {
    if (!(err instanceof RangeError)) throw err;
    return { ...base, status: 'not-converged', reason: `The pair likelihood could not be evaluated: ${err.message}` };
  }
}
