/**
 * Simulation of default panels from the Vasicek one-factor model.
 */
import type { Rng } from './random';
import { conditionalPd } from './vasicek';

export interface SimulatedPanel {
  /** Obligors at the start of each period (a copy of the input). */
  obligors: number[];
  /** Simulated defaults in each period. */
  defaults: number[];
  /** The systematic factor drawn for each period. */
  factor: number[];
}

/**
 * Simulate one panel of default counts with the given cohort sizes.
 *
 * x_t ~ N(0, 1) independent,  d_t | x_t ~ Binomial(n_t, P(x_t)),
 * P(x) = Phi((Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho))
 *
 * Method: for each period in order, one rng.normal() for the factor, then one exact
 * rng.binomial(n_t, P(x_t)) (inversion or BTPE, never a normal approximation). The draws are
 * consumed in that fixed order, so a seed reproduces the panel exactly.
 *
 * Special cases: an empty obligors array gives an empty panel; rho = 0 gives independent
 * Binomial(n_t, p) counts; rho = 1 gives d_t in {0, n_t}. pd outside [0, 1], rho outside [0, 1]
 * or an obligor count that is not a non-negative integer throw RangeError naming the position.
 *
 * @example simulatePanel({ pd: 0.01, rho: 0.12, obligors: [1000, 1000] }, createRng(7))
 *
 * Reference: Vasicek (2002), "The distribution of loan portfolio value", Risk 15(12), eq. (1);
 * Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short panels of
 * credit rating performance data", Federal Reserve Board working paper, section 2.
 */
export function simulatePanel(
  opts: { pd: number; rho: number; obligors: number[] },
  rng: Rng,
): SimulatedPanel {
  const { pd, rho, obligors } = opts;
  if (typeof pd !== 'number' || Number.isNaN(pd) || pd < 0 || pd > 1) {
    throw new RangeError(`simulatePanel: pd must be in [0, 1], got ${String(pd)}.`);
  }
  if (typeof rho !== 'number' || Number.isNaN(rho) || rho < 0 || rho > 1) {
    throw new RangeError(`simulatePanel: rho must be in [0, 1], got ${String(rho)}.`);
  }
  if (!Array.isArray(obligors)) {
    throw new RangeError('simulatePanel: obligors must be an array of cohort sizes.');
  }
  obligors.forEach((n, t) => {
    if (!Number.isSafeInteger(n) || n < 0) {
      throw new RangeError(
        `simulatePanel: obligors[${t}] must be a non-negative integer, got ${String(n)}.`,
      );
    }
  });
  const T = obligors.length;
  const defaults = new Array<number>(T);
  const factor = new Array<number>(T);
  for (let t = 0; t < T; t++) {
    const x = rng.normal();
    factor[t] = x;
    defaults[t] = rng.binomial(obligors[t], conditionalPd(pd, rho, x));
  }
  return { obligors: obligors.slice(), defaults, factor };
}
