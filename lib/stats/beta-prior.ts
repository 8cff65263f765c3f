/**
 * Beta priors for an asset correlation or a PD: the prior's specification, its log-density and
 * the probability it gives an interval.
 */
import betaCdf from '@stdlib/stats-base-dists-beta-cdf';
import betaLogPdf from '@stdlib/stats-base-dists-beta-logpdf';

/**
 * A prior on rho as the user states it: `flat` (Beta(1, 1)), `supervisory` (a Beta centred on the
 * segment's supervisory correlation with strength a + b) or a user-given Beta(a, b).
 */
export type RhoPriorSpec = { kind: 'flat' } | { kind: 'supervisory'; strength: number } | { kind: 'beta'; a: number; b: number };

/** A Beta(a, b) law with the label the outputs show. */
export interface BetaLaw {
  a: number;
  b: number;
  label: string;
}

/**
 * The Beta law of a prior on rho. `supervisory:s` is Beta(s rho_sup, s (1 - rho_sup)): mean
 * rho_sup (the segment's supervisory correlation, BCBS 2006 paras 272-273, 328-330), and s = a + b
 * the weight of the prior in pseudo-observations (Kiefer 2009, section 3, on eliciting a Beta
 * prior from an expert's centre and confidence).
 *
 * Special cases: a or b not positive and finite, a strength not positive, or a supervisory prior
 * without a supervisory rho in (0, 1) throw RangeError with a sentence.
 *
 * @example rhoPriorLaw({ kind: 'supervisory', strength: 20 }, 0.15) // { a: 3, b: 17, label: 'supervisory:20 (Beta(3, 17), mean 0.15)' }
 *
 * Reference: Kiefer, N. M. (2009), "Default estimation for low-default portfolios", Journal of
 * Empirical Finance 16:164-173.
 */
export function rhoPriorLaw(spec: RhoPriorSpec, supervisoryRho: number | null): BetaLaw {
  if (spec.kind === 'flat') return { a: 1, b: 1, label: 'flat' };
  if (spec.kind === 'supervisory') {
    if (!(spec.strength > 0 && Number.isFinite(spec.strength))) {
      throw new RangeError(`The strength of the supervisory prior must be a positive number (a + b, in pseudo-observations); got ${spec.strength}.`);
    }
    if (supervisoryRho === null || !(supervisoryRho > 0 && supervisoryRho < 1)) {
      throw new RangeError('A prior centred on the supervisory correlation needs the segment\'s asset class (set it on the dataset, or pass --asset-class).');
    }
    const a = spec.strength * supervisoryRho;
    const b = spec.strength * (1 - supervisoryRho);
    return { a, b, label: `supervisory:${spec.strength}` };
  }
  assertBeta(spec.a, spec.b, 'the prior on rho');
  return { a: spec.a, b: spec.b, label: `beta:${spec.a},${spec.b}` };
}

/** Throws RangeError unless a and b are positive finite numbers. */
export function assertBeta(a: number, b: number, what: string): void {
  if (!(a > 0 && Number.isFinite(a)) || !(b > 0 && Number.isFinite(b))) {
    throw new RangeError(`A Beta prior needs a > 0 and b > 0 (${what}); got a = ${a}, b = ${b}. A Beta law with a or b at 0 puts no mass inside (0, 1).`);
  }
}

/**
 * Probability that a Beta(a, b) law gives to [lo, hi] (0 <= lo <= hi <= 1).
 *
 * Method: the regularised incomplete beta function (stdlib-js betainc via the Beta CDF), as the
 * difference of the CDF at the ends or, where that cancels (both ends in the upper tail), of the
 * upper tails.
 *
 * @example betaProbability(1, 1, 0.2, 0.3) // 0.1
 *
 * Reference: DiDonato, A. R. & Morris, A. H. (1992), "Algorithm 708: significant digit computation
 * of the incomplete beta function ratios", ACM TOMS 18:360-373 (the method of stdlib's betainc).
 */
export function betaProbability(a: number, b: number, lo: number, hi: number): number {
  const lower = betaCdf(lo, a, b);
  // Upper tails by symmetry, 1 - F(x; a, b) = F(1 - x; b, a), where the CDF difference would cancel.
  if (lower > 0.5) return Math.max(0, betaCdf(1 - lo, b, a) - betaCdf(1 - hi, b, a));
  return Math.max(0, betaCdf(hi, a, b) - lower);
}

/** log of the Beta(a, b) density at x in (0, 1). */
export function betaLogDensity(x: number, a: number, b: number): number {
  return betaLogPdf(x, a, b);
}
