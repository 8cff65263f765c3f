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
 * x_1 ~ N(0, 1),  x_t = phi x_(t-1) + sqrt(1 - phi^2) e_t (e_t ~ N(0, 1) independent),
 * d_t | x_t ~ Binomial(n_t, P(x_t)),  P(x) = Phi((Phi^-1(p) - sqrt(rho) x) / sqrt(1 - rho)).
 * phi = 0 (the default) is the independent factor of the basic model; otherwise the factor is a
 * stationary AR(1) with standard normal margins (the persistent factor of lib/stats/ar1-likelihood.ts).
 *
 * Method: for each period in order, one rng.normal() for e_t, then one exact
 * rng.binomial(n_t, P(x_t)) (inversion or BTPE, never a normal approximation). The draws are
 * consumed in that fixed order whatever phi, so a seed reproduces the panel exactly, and with
 * phi = 0 the factor is e_t exactly (0 x_(t-1) + 1 e_t), the stream of the independent model.
 *
 * Special cases: an empty obligors array gives an empty panel; rho = 0 gives independent
 * Binomial(n_t, p) counts; rho = 1 gives d_t in {0, n_t}. pd outside [0, 1], rho outside [0, 1],
 * phi outside (-1, 1) or an obligor count that is not a non-negative integer throw RangeError
 * naming the position.
 *
 * @example simulatePanel({ pd: 0.01, rho: 0.12, obligors: [1000, 1000], phi: 0.6 }, createRng(7))
 *
 * Reference: Vasicek (2002), "The distribution of loan portfolio value", Risk 15(12), eq. (1);
 * Gordy, M. B. & Heitfield, E. (2002), "Estimating default correlations from short panels of
 * credit rating performance data", Federal Reserve Board working paper, section 2; McNeil, A. J. &
 * Wendin, J. (2007), "Bayesian inference for generalized linear mixed models of portfolio credit
 * risk", Journal of Empirical Finance 14:131-149, section 2 (autocorrelated random effects).
 */
export function simulatePanel(
  opts: { pd: number; rho: number; obligors: number[]; phi?: number },
  rng: Rng,
): SimulatedPanel {
  const { pd, rho, obligors } = opts;
  const phi = opts.phi ?? 0;
  if (typeof phi !== 'number' || !(phi > -1 && phi < 1)) {
    throw new RangeError(`simulatePanel: phi (the factor's autocorrelation) must be strictly between -1 and 1, got ${String(phi)}.`);
  }
  const innovation = Math.sqrt(1 - phi * phi);
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
  let previous = 0;
  for (let t = 0; t < T; t++) {
    const e = rng.normal();
    const x = t === 0 ? e : phi * previous + innovation * e;
    previous = x;
    factor[t] = x;
    defaults[t] = rng.binomial(obligors[t], conditionalPd(pd, rho, x));
  }
  return { obligors: obligors.slice(), defaults, factor };
}
