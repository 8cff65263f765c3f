/**
 * The mixing laws side by side on the same data: fit (log-likelihood, AIC, BIC) and what each law
 * implies for the tail (default-rate quantiles of a granular pool, joint default probability and
 * default correlation of two obligors, tail dependence of the latent variables).
 */
import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import { betaParameters, betaSecondMoment } from './beta-binomial';
import { betaThetaFromEquivalentRho } from './estimators/beta-mixing-mle';
import type { BetaMixingFit } from './estimators/beta-mixing-mle';
import type { LogitNormalFit } from './estimators/logit-normal-mle';
import type { TCopulaFit } from './estimators/t-copula-mle';
import type { LawPit } from './law-count-pit';
import { logitNormalMoment, logitNormalRateQuantile } from './logit-normal-mixing';
import { normalQuantile } from './normal';
import { bivariateTJointDefault, tCopulaTailDependence, tDefaultRateQuantile } from './t-copula-tail';
import { jointDefaultProbability, vasicekQuantile } from './vasicek';
import type { FittedLaw } from './fitted-law';

/** The law names of the comparison. */
export const MIXING_LAWS = ['gaussian', 't', 'beta', 'logitNormal'] as const;
export type MixingLaw = (typeof MIXING_LAWS)[number];

/** The readable name of each law. */
export const MIXING_LAW_LABELS: Readonly<Record<MixingLaw, string>> = {
  gaussian: 'Gaussian copula (probit-normal)',
  t: 'Student-t copula',
  beta: 'Beta mixing',
  logitNormal: 'Logit-normal mixing',
};

/** One law's row of the comparison. */
export interface LawComparison {
  law: MixingLaw;
  logLik: number;
  /** Free parameters: 2 for the Gaussian, beta and logit-normal laws, 3 for the t copula. */
  parameters: number;
  aic: number;
  /** BIC with the number of years as the sample size. */
  bic: number;
  /** Default-rate quantiles of an infinitely granular pool. */
  quantile99: number;
  quantile999: number;
  /** Each quantile divided by the Gaussian law's. */
  quantile99Ratio: number;
  quantile999Ratio: number;
  /** Joint default probability of two obligors in one year, E[pi^2]. */
  jointDefault: number;
  /** (jointDefault - p^2) / (p (1 - p)). */
  defaultCorrelation: number;
  /** Lower tail dependence of the latent variables: 0 for the Gaussian copula, the t formula; null for the mixing laws without latent variables. */
  tailDependence: number | null;
  /**
   * The granular probability integral transform of each year under this law at its fitted values,
   * with its uniformity test and tail years (law-count-pit.ts); null when it could not be computed
   * (pitNote says why). Absent from results stored before it was added.
   */
  pit?: LawPit | null;
  /** Why pit is null, in a sentence. */
  pitNote?: string;
}

/** The fitted laws of the estimators' results that have a maximum (undefined ones are left out). */
export function fittedLaws(
  gaussian: { pd: number | null; rho: number | null; logLik: number | null },
  t: TCopulaFit | null,
  beta: BetaMixingFit | null,
  logitNormal: LogitNormalFit | null,
): FittedLaw[] {
  const laws: FittedLaw[] = [];
  if (gaussian.pd !== null && gaussian.rho !== null && gaussian.logLik !== null) laws.push({ law: 'gaussian', logLik: gaussian.logLik, pd: gaussian.pd, rho: gaussian.rho });
  if (t && t.logLik !== null && t.pd !== null && t.rho !== null && t.status !== 'not-converged') {
    laws.push({ law: 't', logLik: t.logLik, pd: t.pd, rho: t.rho, nu: t.nu ?? Number.POSITIVE_INFINITY });
  }
  if (beta && beta.logLik !== null && beta.pd !== null && beta.equivalentRho !== null && beta.status !== 'not-converged') {
    laws.push({ law: 'beta', logLik: beta.logLik, pd: beta.pd, equivalentRho: beta.equivalentRho });
  }
  if (logitNormal && logitNormal.logLik !== null && logitNormal.mu !== null && logitNormal.sigma !== null && logitNormal.status !== 'not-converged') {
    laws.push({ law: 'logitNormal', logLik: logitNormal.logLik, mu: logitNormal.mu, sigma: logitNormal.sigma });
  }
  return laws;
}

/** Quantile q of the beta law's default rate; at theta = 0 (no mixing) the rate is p. */
function betaRateQuantile(q: number, p: number, r: number): number {
  const theta = betaThetaFromEquivalentRho(p, r);
  if (theta === 0) return p;
  const { a, b } = betaParameters(p, theta);
  return betaQuantile(q, a, b);
}

/**
 * Quantile q of the default rate of an infinitely granular pool under a fitted mixing law: the x
 * with P(pi <= x) = q.
 *
 * - Gaussian: Phi((Phi^-1(p) + sqrt(rho) Phi^-1(q)) / sqrt(1 - rho)) (Vasicek 2002, eq. 4);
 * - t copula: the root of the distribution function of Frey & McNeil (2003), section 3
 *   (tDefaultRateQuantile);
 * - beta: the Beta(a, b) quantile of the law with mean p and the given equivalent rho;
 * - logit-normal: 1 / (1 + exp(-(mu + sigma Phi^-1(q)))), as the rate is increasing in the factor.
 *
 * Method: the closed forms above; the t copula by Brent's root of its distribution function.
 *
 * Special cases: rho = 0 (Gaussian), theta = 0 (beta) and sigma = 0 (logit-normal) leave no mixing:
 * the rate is p (logistic(mu)) at every q. q outside (0, 1) throws RangeError.
 *
 * @example lawRateQuantile({ law: 'gaussian', logLik: -40, pd: 0.01, rho: 0.12 }, 0.999) // ≈ 0.0903
 *
 * Reference: Vasicek (2002), The distribution of loan portfolio value, Risk 15(12), eq. 4;
 * Frey & McNeil (2003), Dependent defaults in models of portfolio credit risk, section 3.
 */
export function lawRateQuantile(law: FittedLaw, q: number): number {
  if (!(q > 0 && q < 1)) throw new RangeError(`lawRateQuantile: q must be strictly between 0 and 1; got ${q}.`);
  switch (law.law) {
    case 'gaussian':
      return law.rho === 0 ? law.pd : vasicekQuantile(q, law.pd, law.rho);
    case 't':
      return tDefaultRateQuantile(q, law.pd, law.rho, law.nu);
    case 'beta':
      return betaRateQuantile(q, law.pd, law.equivalentRho);
    case 'logitNormal':
      return logitNormalRateQuantile(normalQuantile(q), law.mu, law.sigma);
  }
}

function lawTail(law: FittedLaw): { q99: number; q999: number; pd: number; joint: number; tail: number | null } {
  switch (law.law) {
    case 'gaussian':
      return {
        q99: lawRateQuantile(law, 0.99),
        q999: lawRateQuantile(law, 0.999),
        pd: law.pd,
        joint: jointDefaultProbability(law.pd, law.pd, law.rho),
        tail: 0,
      };
    case 't':
      return {
        q99: lawRateQuantile(law, 0.99),
        q999: lawRateQuantile(law, 0.999),
        pd: law.pd,
        joint: bivariateTJointDefault(law.pd, law.pd, law.rho, law.nu),
        tail: tCopulaTailDependence(law.rho, law.nu),
      };
    case 'beta': {
      const theta = betaThetaFromEquivalentRho(law.pd, law.equivalentRho);
      return {
        q99: lawRateQuantile(law, 0.99),
        q999: lawRateQuantile(law, 0.999),
        pd: law.pd,
        joint: betaSecondMoment(law.pd, theta),
        tail: null,
      };
    }
    case 'logitNormal':
      return {
        q99: lawRateQuantile(law, 0.99),
        q999: lawRateQuantile(law, 0.999),
        pd: logitNormalMoment(law.mu, law.sigma, 1),
        joint: logitNormalMoment(law.mu, law.sigma, 2),
        tail: null,
      };
  }
}

const PARAMETERS: Readonly<Record<MixingLaw, number>> = { gaussian: 2, t: 3, beta: 2, logitNormal: 2 };

/**
 * The comparison table of the fitted laws: log-likelihood, AIC = 2 k - 2 l, BIC = k log T - 2 l
 * (T the number of years: the years, not the obligors, are the independent draws of the mixing
 * variable), the default-rate quantiles at 99% and 99.9% of an infinitely granular pool and their
 * ratios to the Gaussian law's, the joint default probability E[pi^2], the default correlation
 * (E[pi^2] - p^2) / (p (1 - p)), and the lower tail dependence of the latent variables.
 *
 * Special cases: without a Gaussian row the ratios cannot be formed: RangeError; T < 1 throws.
 *
 * Reference: Akaike (1974); Schwarz (1978); Vasicek (2002) and Frey & McNeil (2003) for the
 * quantiles; McNeil, Frey & Embrechts (2015), example 7.39 for the tail dependence.
 */
export function compareMixingLaws(laws: readonly FittedLaw[], years: number): LawComparison[] {
  if (!(Number.isInteger(years) && years >= 1)) throw new RangeError(`compareMixingLaws: the number of years must be a whole number of at least 1; got ${years}.`);
  const gaussian = laws.find((l) => l.law === 'gaussian');
  if (!gaussian) throw new RangeError('compareMixingLaws: the Gaussian law is needed as the reference of the ratios.');
  const reference = lawTail(gaussian);
  return laws.map((law) => {
    const tail = law === gaussian ? reference : lawTail(law);
    const k = PARAMETERS[law.law];
    return {
      law: law.law,
      logLik: law.logLik,
      parameters: k,
      aic: 2 * k - 2 * law.logLik,
      bic: k * Math.log(years) - 2 * law.logLik,
      quantile99: tail.q99,
      quantile999: tail.q999,
      quantile99Ratio: tail.q99 / reference.q99,
      quantile999Ratio: tail.q999 / reference.q999,
      jointDefault: tail.joint,
      defaultCorrelation: (tail.joint - tail.pd * tail.pd) / (tail.pd * (1 - tail.pd)),
      tailDependence: tail.tail,
    };
  });
}
