/**
 * Quintic Hermite interpolation: the unique polynomial of degree 5 on [x0, x1] that takes given
 * values and first and second derivatives at both ends (six conditions). Error O(h^6 f^(6)); a
 * polynomial of degree 5 or less is reproduced exactly.
 *
 * With t = (x - x0) / h, h = x1 - x0, the interpolant is
 *   f0 H0(t) + h f0' H1(t) + h^2 f0'' H2(t) + f1 H3(t) + h f1' H4(t) + h^2 f1'' H5(t),
 * H0 = 1 - 10t^3 + 15t^4 - 6t^5, H1 = t - 6t^3 + 8t^4 - 3t^5, H2 = (t^2 - 3t^3 + 3t^4 - t^5) / 2,
 * H3 = 10t^3 - 15t^4 + 6t^5, H4 = -4t^3 + 7t^4 - 3t^5, H5 = (t^3 - 2t^4 + t^5) / 2.
 *
 * Reference: Burden, R. L. & Faires, J. D. (2011), Numerical Analysis, 9th ed., section 3.4
 * (Hermite interpolation).
 */

/** The interpolant and its first two x-derivatives at one point (written in place by quinticHermite). */
export interface HermiteValue {
  value: number;
  d1: number;
  d2: number;
}

/**
 * The interpolant's value at x between x0 (value f0, derivatives g0, s0) and x1 (f1, g1, s1).
 *
 * @example quinticHermiteValue(0, 0, 0, 0, 1, 1, 5, 20, 0.5) // 0.03125 = 0.5^5 (x^5 reproduced)
 */
export function quinticHermiteValue(x0: number, f0: number, g0: number, s0: number, x1: number, f1: number, g1: number, s1: number, x: number): number {
  return quinticHermite(x0, f0, g0, s0, x1, f1, g1, s1, x, { value: 0, d1: 0, d2: 0 }).value;
}

/**
 * The interpolant and its first two x-derivatives at x (arguments as quinticHermiteValue), written
 * into out. In powers of t: P(t) = f0 + p1 t + p2 t^2 + a3 t^3 + a4 t^4 + a5 t^5 with p1 = h g0,
 * p2 = h^2 s0 / 2, and a3..a5 solving the three conditions at t = 1 (the same polynomial as the
 * basis form of the module comment, evaluated by Horner's rule).
 */
export function quinticHermite(
  x0: number,
  f0: number,
  g0: number,
  s0: number,
  x1: number,
  f1: number,
  g1: number,
  s1: number,
  x: number,
  out: HermiteValue,
): HermiteValue {
  const h = x1 - x0;
  const t = (x - x0) / h;
  const p1 = g0 * h;
  const p2 = 0.5 * s0 * h * h;
  const D0 = f1 - f0 - p1 - p2;
  const D1 = g1 * h - p1 - 2 * p2;
  const D2 = s1 * h * h - 2 * p2;
  const a3 = 10 * D0 - 4 * D1 + 0.5 * D2;
  const a4 = -15 * D0 + 7 * D1 - D2;
  const a5 = 6 * D0 - 3 * D1 + 0.5 * D2;
  out.value = f0 + t * (p1 + t * (p2 + t * (a3 + t * (a4 + t * a5))));
  out.d1 = (p1 + t * (2 * p2 + t * (3 * a3 + t * (4 * a4 + t * 5 * a5)))) / h;
  out.d2 = (2 * p2 + t * (6 * a3 + t * (12 * a4 + t * 20 * a5))) / (h * h);
  return out;
}
