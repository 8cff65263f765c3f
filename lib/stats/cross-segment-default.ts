/**
 * Two obligors from different segments whose factors are correlated: their joint default
 * probability and default correlation.
 */
import { bivariateNormalCdf } from './bivariate-normal';
import { normalQuantile } from './normal';

/** Result of {@link crossSegmentDefault}. */
export interface CrossSegmentDefault {
  /** Correlation of the two obligors' latent variables, sqrt(rho_A rho_B) r. */
  assetCorrelation: number;
  /** P(both default in one year) = Phi2(k_A, k_B; sqrt(rho_A rho_B) r). */
  jointDefault: number;
  /** (jointDefault - p_A p_B) / sqrt(p_A (1 - p_A) p_B (1 - p_B)). */
  defaultCorrelation: number;
}

/**
 * Joint default probability and default correlation of one obligor of segment A and one of
 * segment B, whose factors have correlation r.
 *
 * Obligor i of A defaults when sqrt(rho_A) Z_A + sqrt(1 - rho_A) e_i < k_A, obligor j of B when
 * sqrt(rho_B) Z_B + sqrt(1 - rho_B) e_j < k_B, corr(Z_A, Z_B) = r, so the two latent variables are
 * standard bivariate normal with correlation sqrt(rho_A rho_B) r and
 *
 *   P(both) = Phi2(k_A, k_B; sqrt(rho_A rho_B) r),
 *   default correlation = (P(both) - p_A p_B) / sqrt(p_A (1 - p_A) p_B (1 - p_B)).
 *
 * Method: bivariateNormalCdf (Genz 2004, lib/stats/bivariate-normal.ts).
 *
 * Special cases: r = 0 gives P(both) = p_A p_B and default correlation 0; PDs outside (0, 1), rho
 * outside [0, 1] or r outside [-1, 1] throw RangeError.
 *
 * @example crossSegmentDefault(0.01, 0.12, 0.02, 0.15, 0.6)
 *
 * Reference: Vasicek, O. (2002), Risk 15(12) (the latent-variable model); Gupton, G. M., Finger,
 * C. C. & Bhatia, M. (1997), CreditMetrics technical document, ch. 8 (asset correlation of two
 * obligors from their factor loadings and the factors' correlation).
 */
export function crossSegmentDefault(pA: number, rhoA: number, pB: number, rhoB: number, r: number): CrossSegmentDefault {
  for (const [name, p] of [['pA', pA], ['pB', pB]] as const) {
    if (!(p > 0 && p < 1)) throw new RangeError(`crossSegmentDefault: ${name} must be strictly between 0 and 1; got ${p}.`);
  }
  for (const [name, rho] of [['rhoA', rhoA], ['rhoB', rhoB]] as const) {
    if (!(rho >= 0 && rho <= 1)) throw new RangeError(`crossSegmentDefault: ${name} must be in [0, 1]; got ${rho}.`);
  }
  if (!(r >= -1 && r <= 1)) throw new RangeError(`crossSegmentDefault: the factor correlation r must be in [-1, 1]; got ${r}.`);
  const assetCorrelation = Math.sqrt(rhoA * rhoB) * r;
  const jointDefault = bivariateNormalCdf(normalQuantile(pA), normalQuantile(pB), assetCorrelation);
  const defaultCorrelation = (jointDefault - pA * pB) / Math.sqrt(pA * (1 - pA) * pB * (1 - pB));
  return { assetCorrelation, jointDefault, defaultCorrelation };
}
