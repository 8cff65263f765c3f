/**
 * What a fitted (p, rho) implies: the 99.9% default-rate quantile, IRB capital at the estimate and
 * at the interval ends, the supervisory comparison, and two obligors' joint default probability.
 */
import { capitalRequirement, supervisoryCorrelation, type AssetClass } from './irb';
import { defaultCorrelation, jointDefaultProbability, vasicekQuantile } from './vasicek';

/** Loss given default used for the capital implications unless the caller gives another. */
export const DEFAULT_LGD = 0.45;

/** How capital is computed in the implications block. */
export interface CapitalConvention {
  /** Loss given default (default 0.45). */
  lgd: number;
  /** Effective maturity in years for the maturity adjustment, or null for none (default null). */
  maturityYears: number | null;
  /** Asset class for the supervisory comparison, or null for none. */
  assetClass: AssetClass | null;
  /** Annual turnover in EUR millions (SME size adjustment of 'sme-corporate'). */
  turnoverMillions: number | null;
}

/** The implications block: what the fitted (p, rho) mean. */
export interface Implications {
  pd: number;
  rho: number;
  /** 99.9% quantile of the fitted Vasicek default-rate distribution. */
  quantile999: number;
  lgd: number;
  maturityYears: number | null;
  /** The capital convention in words. */
  convention: string;
  /** IRB capital K per unit of exposure at the fitted PD and rho = estimate / interval ends. */
  capital: { atEstimate: number; atLower: number | null; atUpper: number | null };
  /** Supervisory correlation of the asset class at the fitted PD and the capital it implies. */
  supervisory: { assetClass: AssetClass; rho: number; capital: number } | null;
  /** Two obligors with the fitted PD: joint default probability Phi2(k, k; rho), p^2 when independent, default correlation. */
  pair: { joint: number; independent: number; defaultCorrelation: number };
}

/**
 * What a fitted (p, rho) implies: the 99.9% default-rate quantile and IRB capital.
 *
 * quantile999 = Phi((Phi^-1(p) + sqrt(rho) Phi^-1(0.999)) / sqrt(1 - rho)) (Vasicek 2002);
 * K(r) = LGD [Phi((Phi^-1(p) + sqrt(r) Phi^-1(0.999)) / sqrt(1 - r)) - p] x MA (BCBS 2006
 * para 272) at r = rho_hat and at both interval ends, per unit of exposure at default, with the
 * fitted PD (not floored), LGD 0.45 unless given, and the maturity adjustment only when a
 * maturity is given. When an asset class is given, its supervisory correlation at the fitted PD
 * (BCBS 2006 paras 272-273, 328-330) and the capital it implies under the same convention. And
 * for two obligors with the fitted PD: joint default probability Phi2(k, k; rho), p^2, and the
 * default correlation (Phi2 - p^2) / (p (1 - p)) (DESIGN.md, "The model").
 *
 * Method: capitalRequirement and supervisoryCorrelation of lib/stats/irb.ts.
 *
 * Special cases: an interval end of 0 gives K = 0; PD outside (0, 1), rho outside [0, 1) or an
 * interval end outside [0, 1) throw RangeError (from irb.ts).
 *
 * @example capitalImplications(0.013307, 0.037091, { lower: 0.0118, upper: 0.1147 })
 *
 * Reference: BCBS (2006), International Convergence of Capital Measurement and Capital
 * Standards, paras 272-273 and 328-330; BCBS (2005), An Explanatory Note on the Basel II IRB Risk
 * Weight Functions; Vasicek, O. (2002), Risk 15(12), eq. (6).
 */
export function capitalImplications(
  pd: number,
  rho: number,
  interval: { lower: number; upper: number } | null,
  convention: Partial<CapitalConvention> = {},
): Implications {
  const lgd = convention.lgd ?? DEFAULT_LGD;
  const maturityYears = convention.maturityYears ?? null;
  const assetClass = convention.assetClass ?? null;
  const capitalAt = (r: number) =>
    // K = 0 at r = 0 exactly (irb.ts documents this; its formula leaves a rounding residue of
    // Phi(Phi^-1(pd)) - pd there, ~1e-18, which would print as "-0.00%").
    r === 0 ? 0 : capitalRequirement(maturityYears === null ? { pd, lgd, rho: r } : { pd, lgd, rho: r, maturityYears });
  const words =
    `IRB capital K per unit of exposure at default (BCBS 2006 para 272): 99.9% factor quantile, fitted PD ${pd.toPrecision(4)} (no PD floor), ` +
    `LGD ${lgd}, ${maturityYears === null ? 'no maturity adjustment' : `maturity adjustment at M = ${maturityYears} years`}; ` +
    'risk weight = 12.5 x K without the 1.06 scaling factor (2017 convention).';
  let supervisory: Implications['supervisory'] = null;
  if (assetClass !== null) {
    const r = supervisoryCorrelation(
      assetClass,
      pd,
      convention.turnoverMillions === null || convention.turnoverMillions === undefined ? {} : { turnoverMillions: convention.turnoverMillions },
    );
    supervisory = { assetClass, rho: r, capital: capitalAt(r) };
  }
  return {
    pd,
    rho,
    quantile999: vasicekQuantile(0.999, pd, rho),
    lgd,
    maturityYears,
    convention: words,
    capital: {
      atEstimate: capitalAt(rho),
      atLower: interval ? capitalAt(interval.lower) : null,
      atUpper: interval ? capitalAt(interval.upper) : null,
    },
    supervisory,
    pair: { joint: jointDefaultProbability(pd, pd, rho), independent: pd * pd, defaultCorrelation: defaultCorrelation(pd, pd, rho) },
  };
}
