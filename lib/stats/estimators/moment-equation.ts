/**
 * The moment equation shared by the moment estimators: find rho with
 * Phi2(k, k; rho) - p^2 = target, k = Phi^-1(p).
 */
import { bivariateNormalExcess } from '../bivariate-normal';
import { brentRoot } from '../brent';
import { normalQuantile } from '../normal';

/** Relative distance below the largest target p(1 - p) (rho = 1) that counts as the boundary itself. */
export const BOUNDARY_TOLERANCE = 1e-9;

/** Outcome of {@link solveMomentEquation}. */
export type MomentSolution =
  | { kind: 'root'; rho: number; converged: boolean; iterations: number }
  | { kind: 'too-large'; maximum: number };

/**
 * Solves the Vasicek default-rate variance equation for the asset correlation.
 *
 * Finds rho in [0, 1] with Phi2(k, k; rho) - p^2 = target, k = Phi^-1(p): the variance of the
 * conditional default rate of an infinitely granular pool (Vasicek 2002), equivalently the
 * covariance of two obligors' default indicators.
 *
 * Method: Brent's root finder on [0, 1]; the left side, computed by bivariateNormalExcess without
 * cancellation, increases strictly from 0 (rho = 0) to p(1 - p) (rho = 1), so the root is unique
 * when 0 < target < p(1 - p). The argument tolerance 1e-17 (plus 4.4e-16 rho) makes the relative
 * residual about 1e-14 or better.
 *
 * Special cases: target <= 0 or p outside (0, 1) throw RangeError (the estimators decide what such
 * data mean before calling); target >= p(1 - p) (1 - 1e-9) returns { kind: 'too-large' }: at the
 * boundary rho = 1 within rounding, which data of years that are all 0 or all n reach exactly.
 *
 * @example solveMomentEquation(0.02, 1e-4) // { kind: 'root', rho: ~0.07, ... }
 *
 * Reference: Vasicek, O. (2002), "The distribution of loan portfolio value", Risk 15(12), eq. for
 * the variance of the loss fraction; Gordy (2000), "A comparative anatomy of credit risk models",
 * J. Banking & Finance 24, section on moment matching.
 */
export function solveMomentEquation(p: number, target: number): MomentSolution {
  if (!(p > 0 && p < 1)) {
    throw new RangeError(`solveMomentEquation: p must be strictly between 0 and 1; got ${p}.`);
  }
  if (!(target > 0) || !Number.isFinite(target)) {
    throw new RangeError(`solveMomentEquation: the target must be a positive finite number; got ${target}.`);
  }
  const k = normalQuantile(p);
  const maximum = bivariateNormalExcess(k, k, 1);
  // The maximum is p(1 - p) exactly; a target computed from all-or-nothing years equals it but may
  // come out a rounding below, which the root finder would turn into rho = 0.99999.. as a root.
  if (target >= maximum * (1 - BOUNDARY_TOLERANCE)) return { kind: 'too-large', maximum };
  const root = brentRoot((rho) => bivariateNormalExcess(k, k, rho) - target, 0, 1, {
    tolerance: 1e-17,
    maxIterations: 300,
  });
  return { kind: 'root', rho: root.value, converged: root.converged, iterations: root.iterations };
}

/** Default rates d_t / n_t of a panel. */
export function defaultRates(obligors: readonly number[], defaults: readonly number[]): number[] {
  return obligors.map((n, t) => defaults[t] / n);
}

/** Arithmetic mean (plain summation; T is small). */
export function mean(values: readonly number[]): number {
  let s = 0;
  for (const v of values) s += v;
  return s / values.length;
}
