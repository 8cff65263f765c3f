/**
 * Both tails of the standard normal distribution at one point, in the form the binomial-mixture
 * likelihoods need: log Phi(z), log Phi(-z), the inverse Mills ratios and the curvatures of the two
 * logs, without underflow or cancellation for any finite z.
 */
import erfcx from '@stdlib/math-base-special-erfcx';

const INV_SQRT_2PI = 0.3989422804014326779;
const SQRT_2_OVER_PI = 0.7978845608028654;
/** Beyond this |z| the curvature of the far tail comes from its asymptotic series (see normalTails). */
const SERIES_FROM = 50;

/** Slots of the array filled by {@link normalTails}. */
export const TAIL = {
  /** log Phi(z) */
  logP: 0,
  /** log Phi(-z) */
  logQ: 1,
  /** phi(z) / Phi(z) = (log Phi)'(z) */
  millsP: 2,
  /** phi(z) / Phi(-z) = -(d/dz) log Phi(-z) */
  millsQ: 3,
  /** -(log Phi)''(z) = millsP (z + millsP), in (0, 1) */
  curvP: 4,
  /** -(d^2/dz^2) log Phi(-z) = millsQ (millsQ - z), in (0, 1) */
  curvQ: 5,
} as const;

/** Length of the array {@link normalTails} fills. */
export const TAIL_SLOTS = 6;

/**
 * log Phi(z), log Phi(-z), their first derivatives (inverse Mills ratios) and minus their second
 * derivatives, written into `out` at the slots of {@link TAIL}.
 *
 * With t = |z| and the small tail Phi(-t) = erfcx(t / sqrt 2) exp(-t^2 / 2) / 2:
 * log Phi(-t) = log(erfcx(t / sqrt 2) / 2) - t^2 / 2, lambda_s = phi(t) / Phi(-t) =
 * sqrt(2 / pi) / erfcx(t / sqrt 2), and its curvature w_s = lambda_s (lambda_s - t); the large
 * side log Phi(t) = log1p(-Phi(-t)), lambda_b = phi(t) / Phi(t), w_b = lambda_b (lambda_b + t).
 * For z < 0 the small side is Phi(z), otherwise Phi(-z).
 *
 * Method: one erfcx (stdlib-js, ~1e-16 relative) and one exp. w_s = lambda_s (lambda_s - t) cancels
 * for large t (lambda_s - t ~ 1/t): beyond t = 50 it is taken from the asymptotic series of the
 * Mills ratio, t Phi(-t) / phi(t) = S(u) = 1 - u + 3u^2 - 15u^3 + 105u^4 - 945u^5, u = 1/t^2,
 * as w_s = (1 - 3u + 15u^2 - 105u^3 + 945u^4 - 10395u^5) / S(u)^2 (truncation below 1e-15
 * relative at t = 50), so Newton steps far from a mode keep the right curvature. Below t = 50 the
 * direct product keeps ~t^2 1e-16 relative.
 *
 * Special cases: z = 0 gives log(1/2) on both sides, mills sqrt(2/pi) and curvature 2/pi; z must
 * be finite (not checked: inner loop).
 *
 * @example const out = new Float64Array(TAIL_SLOTS); normalTails(-40, out); out[TAIL.logP] // -804.608...
 *
 * Reference: Abramowitz, M. & Stegun, I. A. (1964), Handbook of Mathematical Functions, 26.2.12
 * (the asymptotic expansion of the normal tail) and 7.1.2 (erfc); Gordy & Heitfield (2002) for the
 * use in the mixture likelihood.
 */
export function normalTails(z: number, out: Float64Array): void {
  const t = z < 0 ? -z : z;
  const e = erfcx(t * Math.SQRT1_2);
  const half = 0.5 * t * t;
  const gauss = Math.exp(-half);
  const small = 0.5 * e * gauss; // Phi(-t)
  const logSmall = Math.log(0.5 * e) - half;
  const millsSmall = SQRT_2_OVER_PI / e; // phi(t) / Phi(-t)
  let curvSmall: number;
  if (t > SERIES_FROM) {
    const u = 1 / (t * t);
    const s = 1 + u * (-1 + u * (3 + u * (-15 + u * (105 - 945 * u))));
    curvSmall = (1 + u * (-3 + u * (15 + u * (-105 + u * (945 - 10395 * u))))) / (s * s);
  } else {
    curvSmall = millsSmall * (millsSmall - t);
  }
  const logBig = Math.log1p(-small);
  const millsBig = (INV_SQRT_2PI * gauss) / (1 - small); // phi(t) / Phi(t)
  const curvBig = millsBig * (millsBig + t);
  if (z < 0) {
    out[0] = logSmall;
    out[2] = millsSmall;
    out[4] = curvSmall;
    out[1] = logBig;
    out[3] = millsBig;
    out[5] = curvBig;
  } else {
    out[0] = logBig;
    out[2] = millsBig;
    out[4] = curvBig;
    out[1] = logSmall;
    out[3] = millsSmall;
    out[5] = curvSmall;
  }
}
