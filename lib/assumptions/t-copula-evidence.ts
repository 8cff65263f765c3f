import { AppError } from '@/lib/errors';

/**
 * The evidence of a t-copula assumption: a segment's `estimates.tCopula` of a fit run (the
 * one-factor Student-t copula by maximum likelihood, lib/stats/estimators/t-copula-mle.ts: { rho,
 * pd, nu, logLik, status, intervals: { profile: { level, lower, upper } }, nuInterval: { level,
 * lower, upper } }, an unbounded end null) read as a value: rho with its profile interval, the PD
 * t_nu(k) it was fitted with, and nu with its profile interval, which the library records beside the
 * value (mixing law "t"). Only an estimate with status ok and a finite nu is drafted: a t fit at the
 * Gaussian limit (nu = infinity) is the Gaussian value, to be drafted as such.
 */

/** The estimator key under which a t-copula value is drafted (the engine's key), and its interval. */
export const T_COPULA_ESTIMATOR = 'tCopula';
export const T_COPULA_INTERVAL = 'profile';

/** The profile-likelihood interval of nu; an end that is unbounded (nu up to infinity) is null. */
export type NuInterval = { level: number; lower: number | null; upper: number | null };

type TCopulaLike = {
  rho?: unknown;
  pd?: unknown;
  nu?: unknown;
  status?: unknown;
  reason?: unknown;
  intervals?: { profile?: { level?: unknown; lower?: unknown; upper?: unknown } | null };
  nuInterval?: { level?: unknown; lower?: unknown; upper?: unknown } | null;
};

export type PickedTCopula = {
  estimate: number;
  pd: number;
  intervalLevel: number;
  intervalLower: number;
  intervalUpper: number;
  nu: number;
  nuInterval: NuInterval;
};

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
const endOrNull = (x: unknown): x is number | null => x === null || finite(x);

/**
 * Why the t-copula estimate of a segment cannot be drafted, in a sentence, or null when it can.
 * The draft form shows the sentence beside the disabled choice; {@link pickTCopula} refuses with it.
 */
export function tCopulaRefusal(segment: string, estimate: unknown): string | null {
  const t = estimate as TCopulaLike | undefined | null;
  if (!t) {
    return `The fit has no Student-t copula estimate for ${segment}: run a fit that challenges the Gaussian copula with the t copula to draft a t-copula value.`;
  }
  if (t.status !== 'ok') {
    const reason = typeof t.reason === 'string' && t.reason ? `: ${t.reason}` : '.';
    return `The Student-t copula estimate of ${segment} has status ${String(t.status)}, not ok, so it cannot be drafted${reason}`;
  }
  if (t.nu === null) {
    return `The Student-t copula maximum of ${segment} is the Gaussian limit (nu = infinity): the data show no fatter joint tail, so draft the Gaussian estimate instead.`;
  }
  const iv = t.intervals?.profile;
  const nuIv = t.nuInterval;
  if (
    !finite(t.rho) || !finite(t.pd) || !finite(t.nu) || !iv || !finite(iv.level) || !finite(iv.lower) || !finite(iv.upper) ||
    !nuIv || !finite(nuIv.level) || !endOrNull(nuIv.lower) || !endOrNull(nuIv.upper)
  ) {
    return `The Student-t copula estimate of ${segment} in this fit lacks rho, the PD, nu or their profile intervals; run the fit again with its intervals.`;
  }
  return null;
}

/**
 * The t-copula estimate of `segment` as evidence, or an AppError naming the field: the estimator
 * when there is none or it cannot be drafted (its sentence), the interval when another than the
 * profile interval is asked for.
 */
export function pickTCopula(segmentResult: { segment: string; estimates?: Record<string, unknown> }, intervalMethod: string): PickedTCopula {
  const t = segmentResult.estimates?.[T_COPULA_ESTIMATOR];
  const refusal = tCopulaRefusal(segmentResult.segment, t);
  if (refusal) throw new AppError('invalid:estimator', refusal, { field: 'estimator' });
  if (intervalMethod !== T_COPULA_INTERVAL) {
    throw new AppError(
      'invalid:interval',
      `A Student-t copula value carries the profile-likelihood interval of rho (p and nu re-maximised): choose the interval ${T_COPULA_INTERVAL}, not ${intervalMethod}.`,
      { field: 'intervalMethod' },
    );
  }
  const e = t as { rho: number; pd: number; nu: number; intervals: { profile: { level: number; lower: number; upper: number } }; nuInterval: NuInterval };
  return {
    estimate: e.rho,
    pd: e.pd,
    intervalLevel: e.intervals.profile.level,
    intervalLower: e.intervals.profile.lower,
    intervalUpper: e.intervals.profile.upper,
    nu: e.nu,
    nuInterval: { level: e.nuInterval.level, lower: e.nuInterval.lower, upper: e.nuInterval.upper },
  };
}

/** nu in words: "4.2" with two significant decimals at most; an unbounded end as "infinity (unbounded)". */
export function nuText(nu: number | null): string {
  return nu === null ? 'infinity (unbounded)' : String(Math.round(nu * 100) / 100);
}

/** The interval of nu in words, e.g. "[2.9, infinity (unbounded)] at 95%". */
export function nuIntervalText(iv: NuInterval): string {
  return `[${nuText(iv.lower)}, ${nuText(iv.upper)}] at ${Math.round(iv.level * 1000) / 10}%`;
}
