/**
 * Basel II internal-ratings-based (IRB) supervisory formulas: asset correlation by asset class,
 * maturity adjustment, capital requirement K and risk weight.
 *
 * These are policy settings fixed by the supervisor, not estimates; Rhobook shows them beside the
 * user's own estimates for comparison.
 *
 * References: Basel Committee on Banking Supervision (2006), "International Convergence of Capital
 * Measurement and Capital Standards: A Revised Framework, Comprehensive Version", paras 272-273
 * (corporate, sovereign and bank exposures; SME firm-size adjustment), 320 (maturity), 328
 * (residential mortgage), 229 and 329-330 (qualifying revolving retail), 330 (other retail);
 * BCBS (2005), "An Explanatory Note on the Basel II IRB Risk Weight Functions".
 */
import { normalCdf, normalQuantile } from './normal';

export type AssetClass =
  | 'corporate'
  | 'sme-corporate'
  | 'residential-mortgage'
  | 'qualifying-revolving'
  | 'other-retail';

export const ASSET_CLASSES: readonly AssetClass[] = [
  'corporate',
  'sme-corporate',
  'residential-mortgage',
  'qualifying-revolving',
  'other-retail',
];

function assertPd(fn: string, pd: number): void {
  if (typeof pd !== 'number' || Number.isNaN(pd) || pd <= 0 || pd >= 1) {
    throw new RangeError(
      `${fn}: pd must be strictly between 0 and 1 (defaulted exposures, PD = 1, are treated separately under BCBS 2006 para 272), got ${String(pd)}.`,
    );
  }
}

/** Exponential weight w = (1 - e^{-a PD}) / (1 - e^{-a}), computed with expm1 for small PD. */
function pdWeight(pd: number, a: number): number {
  return Math.expm1(-a * pd) / Math.expm1(-a);
}

/**
 * Supervisory asset correlation R of the Basel II IRB approach.
 *
 * corporate:            R = 0.12 w + 0.24 (1 - w),  w = (1 - e^{-50 PD}) / (1 - e^{-50})   (para 272)
 * sme-corporate:        corporate R - 0.04 (1 - (S - 5) / 45), S = annual sales in EUR millions,
 *                       clipped to [5, 50]                                                   (para 273)
 * residential-mortgage: R = 0.15                                                             (para 328)
 * qualifying-revolving: R = 0.04                                                             (para 329)
 * other-retail:         R = 0.03 w + 0.16 (1 - w),  w = (1 - e^{-35 PD}) / (1 - e^{-35})   (para 330)
 *
 * Method: direct evaluation; the weight uses expm1 so that R keeps full precision at tiny PD.
 *
 * Special cases: corporate R -> 0.24 as PD -> 0 and -> 0.12 as PD -> 1. PD outside (0, 1), an
 * unknown asset class, or sme-corporate without a positive finite turnoverMillions throw
 * RangeError. Turnover below 5 is treated as 5 and above 50 as 50, as para 273 prescribes.
 *
 * @example supervisoryCorrelation('corporate', 0.01) // 0.19278...
 *
 * Reference: BCBS (2006) paras 272-273, 328-330; BCBS (2005) section 5.
 */
export function supervisoryCorrelation(
  assetClass: AssetClass,
  pd: number,
  opts: { turnoverMillions?: number } = {},
): number {
  assertPd('supervisoryCorrelation', pd);
  switch (assetClass) {
    case 'corporate': {
      const w = pdWeight(pd, 50);
      return 0.12 * w + 0.24 * (1 - w);
    }
    case 'sme-corporate': {
      const s = opts.turnoverMillions;
      if (typeof s !== 'number' || !Number.isFinite(s) || s <= 0) {
        throw new RangeError(
          `supervisoryCorrelation: 'sme-corporate' needs turnoverMillions, the borrower's annual sales in EUR millions (a positive number), got ${String(s)}.`,
        );
      }
      const sc = Math.min(Math.max(s, 5), 50);
      const w = pdWeight(pd, 50);
      return 0.12 * w + 0.24 * (1 - w) - 0.04 * (1 - (sc - 5) / 45);
    }
    case 'residential-mortgage':
      return 0.15;
    case 'qualifying-revolving':
      return 0.04;
    case 'other-retail': {
      const w = pdWeight(pd, 35);
      return 0.03 * w + 0.16 * (1 - w);
    }
    default:
      throw new RangeError(
        `supervisoryCorrelation: unknown asset class '${String(assetClass)}'; expected one of ${ASSET_CLASSES.join(', ')}.`,
      );
  }
}

/**
 * Basel II IRB maturity adjustment for corporate, sovereign and bank exposures.
 *
 * MA = (1 + (M - 2.5) b) / (1 - 1.5 b),  b = (0.11852 - 0.05478 ln PD)^2
 *
 * Special cases: M = 2.5 gives 1 / (1 - 1.5 b); M must lie in [1, 5] years (para 320 floors
 * effective maturity at one year and caps it at five: apply that before calling) and PD in
 * (0, 1), otherwise RangeError.
 *
 * @example maturityAdjustment(0.01, 2.5) // 1.2598...
 *
 * Reference: BCBS (2006) paras 272 and 320; BCBS (2005) section 4.6.
 */
export function maturityAdjustment(pd: number, maturityYears: number): number {
  assertPd('maturityAdjustment', pd);
  if (
    typeof maturityYears !== 'number' ||
    Number.isNaN(maturityYears) ||
    maturityYears < 1 ||
    maturityYears > 5
  ) {
    throw new RangeError(
      `maturityAdjustment: effective maturity must be between 1 and 5 years (BCBS 2006 para 320), got ${String(maturityYears)}.`,
    );
  }
  const b = (0.11852 - 0.05478 * Math.log(pd)) ** 2;
  return (1 + (maturityYears - 2.5) * b) / (1 - 1.5 * b);
}

export interface CapitalOptions {
  /** Probability of default, strictly between 0 and 1. */
  pd: number;
  /** Loss given default, in [0, 1]. */
  lgd: number;
  /** Asset correlation, in [0, 1). */
  rho: number;
  /** Effective maturity in years, [1, 5]; when given, the maturity adjustment is applied. */
  maturityYears?: number;
  /** Confidence level of the factor quantile; 0.999 by default (BCBS 2006 para 272). */
  confidence?: number;
}

/**
 * Basel II IRB capital requirement K per unit of exposure at default.
 *
 * K = LGD [Phi((Phi^-1(PD) + sqrt(R) Phi^-1(0.999)) / sqrt(1 - R)) - PD] x MA(PD, M)
 *
 * (the conditional expected loss at the 99.9% factor quantile minus the expected loss; the
 * maturity adjustment MA only when maturityYears is given, as for corporate, sovereign and bank
 * exposures; retail formulas, paras 328-330, have no maturity adjustment).
 *
 * Special cases: rho = 0 gives K = 0. PD outside (0, 1), LGD outside [0, 1], rho outside [0, 1),
 * confidence outside (0, 1) or a maturity outside [1, 5] throw RangeError.
 *
 * @example capitalRequirement({ pd: 0.01, lgd: 0.45, rho: 0.1927837, maturityYears: 2.5 }) // 0.07385
 *
 * Reference: BCBS (2006) para 272; BCBS (2005) sections 3-4.
 */
export function capitalRequirement(opts: CapitalOptions): number {
  const { pd, lgd, rho, maturityYears } = opts;
  const confidence = opts.confidence ?? 0.999;
  assertPd('capitalRequirement', pd);
  if (typeof lgd !== 'number' || Number.isNaN(lgd) || lgd < 0 || lgd > 1) {
    throw new RangeError(`capitalRequirement: lgd must be in [0, 1], got ${String(lgd)}.`);
  }
  if (typeof rho !== 'number' || Number.isNaN(rho) || rho < 0 || rho >= 1) {
    throw new RangeError(`capitalRequirement: rho must be in [0, 1), got ${String(rho)}.`);
  }
  if (typeof confidence !== 'number' || Number.isNaN(confidence) || confidence <= 0 || confidence >= 1) {
    throw new RangeError(
      `capitalRequirement: confidence must be strictly between 0 and 1 (the framework uses 0.999), got ${String(confidence)}.`,
    );
  }
  // At rho = 0 the stressed PD is the PD itself: K = 0 exactly (the round trip Phi(Phi^-1(PD))
  // would otherwise leave a rounding residue of either sign).
  const stressedPd =
    rho === 0 ? pd : normalCdf((normalQuantile(pd) + Math.sqrt(rho) * normalQuantile(confidence)) / Math.sqrt(1 - rho));
  const k = lgd * (stressedPd - pd);
  return maturityYears === undefined ? k : k * maturityAdjustment(pd, maturityYears);
}

/**
 * Basel II IRB risk weight: risk-weighted assets per unit of exposure, as a fraction
 * (0.9232 means 92.32%).
 *
 * RW = 12.5 x K x scaling
 *
 * Convention: `scaling` defaults to 1, the 2017 finalised framework (BCBS 2017, "Basel III:
 * Finalising post-crisis reforms", which removed the factor); pass 1.06 for the 2006 framework's
 * scaling factor (BCBS 2006 para 44). Rhobook reports risk weights with scaling 1 unless the caller
 * says otherwise.
 *
 * Special cases: as capitalRequirement; scaling other than 1 or 1.06 throws RangeError.
 *
 * @example riskWeight({ pd: 0.01, lgd: 0.45, rho: supervisoryCorrelation('corporate', 0.01), maturityYears: 2.5 }) // 0.9232
 *
 * Reference: BCBS (2006) paras 44 and 272; BCBS (2005) section 4.
 */
export function riskWeight(opts: CapitalOptions & { scaling?: 1 | 1.06 }): number {
  const scaling = opts.scaling ?? 1;
  if (scaling !== 1 && scaling !== 1.06) {
    throw new RangeError(
      `riskWeight: scaling must be 1 (2017 framework) or 1.06 (2006 framework), got ${String(scaling)}.`,
    );
  }
  return 12.5 * capitalRequirement(opts) * scaling;
}
