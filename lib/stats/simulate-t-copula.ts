/**
 * Simulation of default panels from the one-factor Student-t copula.
 */
import { normalCdf } from './normal';
import type { Rng } from './random';
import { tQuantile } from './t-copula-likelihood';

/**
 * A chi-square(nu) deviate, nu > 0: 2 Gamma(nu / 2, 1).
 *
 * Method: Marsaglia & Tsang's squeeze-and-reject for Gamma(a) with a >= 1 (one normal and one
 * uniform per try, about 1.05 tries on average); for a < 1, Gamma(a + 1) U^(1/a).
 *
 * Special cases: nu not positive throws RangeError.
 *
 * @example chiSquareDeviate(5, createRng(1))
 *
 * Reference: Marsaglia, G. & Tsang, W. W. (2000), "A simple method for generating gamma
 * variables", ACM Transactions on Mathematical Software 26(3):363-372.
 */
export function chiSquareDeviate(nu: number, rng: Rng): number {
  if (!(nu > 0) || !Number.isFinite(nu)) throw new RangeError(`chiSquareDeviate: the degrees of freedom must be a positive finite number; got ${nu}.`);
  const a = nu / 2;
  const boost = a < 1;
  const shape = boost ? a + 1 : a;
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  let g: number;
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = rng.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.uniform();
    if (u < 1 - 0.0331 * x * x * x * x || Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) {
      g = d * v;
      break;
    }
  }
  if (boost) g *= Math.pow(rng.uniform(), 1 / a);
  return 2 * g;
}

/**
 * Simulates one panel of default counts under the one-factor t copula: for each period in order,
 * V_t ~ chi-square(nu), Z_t ~ N(0, 1), then d_t ~ Binomial(n_t, Phi((t_nu^-1(p) sqrt(V_t / nu) -
 * sqrt(rho) Z_t) / sqrt(1 - rho))). nu = Infinity draws no V (the Gaussian model).
 *
 * Special cases: pd outside (0, 1), rho outside [0, 1), nu not above 0, or an obligor count that
 * is not a non-negative whole number throw RangeError naming it.
 *
 * @example simulateTCopulaPanel({ pd: 0.01, rho: 0.1, nu: 4, obligors: [1000, 1000] }, createRng(7))
 *
 * Reference: Frey & McNeil (2003), section 3 (the t copula as a normal variance mixture).
 */
export function simulateTCopulaPanel(opts: { pd: number; rho: number; nu: number; obligors: readonly number[] }, rng: Rng): { obligors: number[]; defaults: number[] } {
  const { pd, rho, nu, obligors } = opts;
  if (!(pd > 0 && pd < 1)) throw new RangeError(`simulateTCopulaPanel: pd must be strictly between 0 and 1; got ${pd}.`);
  if (!(rho >= 0 && rho < 1)) throw new RangeError(`simulateTCopulaPanel: rho must be in [0, 1); got ${rho}.`);
  if (!(nu > 0)) throw new RangeError(`simulateTCopulaPanel: nu must be positive (Infinity for the Gaussian copula); got ${nu}.`);
  obligors.forEach((n, t) => {
    if (!Number.isSafeInteger(n) || n < 0) throw new RangeError(`simulateTCopulaPanel: obligors[${t}] must be a non-negative whole number; got ${String(n)}.`);
  });
  const kt = tQuantile(pd, nu);
  const a = Math.sqrt(rho);
  const b = Math.sqrt(1 - rho);
  const defaults = obligors.map((n) => {
    const s = nu === Number.POSITIVE_INFINITY ? 1 : Math.sqrt(chiSquareDeviate(nu, rng) / nu);
    const z = rng.normal();
    return rng.binomial(n, normalCdf((kt * s - a * z) / b));
  });
  return { obligors: obligors.slice(), defaults };
}
