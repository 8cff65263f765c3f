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
  const h = x1 - x0;
  const t = (x - x0) / h;
  const t2 = t * t;
  const t3 = t2 * t;
  const t4 = t3 * t;
  const t5 = t4 * t;
  const H0 = 1 - 10 * t3 + 15 * t4 - 6 * t5;
  const H1 = t - 6 * t3 + 8 * t4 - 3 * t5;
  const H2 = 0.5 * (t2 - 3 * t3 + 3 * t4 - t5);
  const H3 = 10 * t3 - 15 * t4 + 6 * t5;
  const H4 = -4 * t3 + 7 * t4 - 3 * t5;
  const H5 = 0.5 * (t3 - 2 * t4 + t5);
  return f0 * H0 + h * g0 * H1 + h * h * s0 * H2 + f1 * H3 + h * g1 * H4 + h * h * s1 * H5;
}

/** The interpolant and its first two x-derivatives at x (arguments as quinticHermiteValue), written into out. */
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
  const t2 = t * t;
  const t3 = t2 * t;
  const t4 = t3 * t;
  const t5 = t4 * t;
  // basis on [0, 1]: values, and first and second t-derivatives
  const H0 = 1 - 10 * t3 + 15 * t4 - 6 * t5;
  const H1 = t - 6 * t3 + 8 * t4 - 3 * t5;
  const H2 = 0.5 * (t2 - 3 * t3 + 3 * t4 - t5);
  const H3 = 10 * t3 - 15 * t4 + 6 * t5;
  const H4 = -4 * t3 + 7 * t4 - 3 * t5;
  const H5 = 0.5 * (t3 - 2 * t4 + t5);
  const D0 = -30 * t2 + 60 * t3 - 30 * t4;
  const D1 = 1 - 18 * t2 + 32 * t3 - 15 * t4;
  const D2 = 0.5 * (2 * t - 9 * t2 + 12 * t3 - 5 * t4);
  const D3 = 30 * t2 - 60 * t3 + 30 * t4;
  const D4 = -12 * t2 + 28 * t3 - 15 * t4;
  const D5 = 0.5 * (3 * t2 - 8 * t3 + 5 * t4);
  const E0 = -60 * t + 180 * t2 - 120 * t3;
  const E1 = -36 * t + 96 * t2 - 60 * t3;
  const E2 = 0.5 * (2 - 18 * t + 36 * t2 - 20 * t3);
  const E3 = 60 * t - 180 * t2 + 120 * t3;
  const E4 = -24 * t + 84 * t2 - 60 * t3;
  const E5 = 0.5 * (6 * t - 24 * t2 + 20 * t3);
  const fa1 = h * g0;
  const fa2 = h * h * s0;
  const fb1 = h * g1;
  const fb2 = h * h * s1;
  out.value = f0 * H0 + fa1 * H1 + fa2 * H2 + f1 * H3 + fb1 * H4 + fb2 * H5;
  out.d1 = (f0 * D0 + fa1 * D1 + fa2 * D2 + f1 * D3 + fb1 * D4 + fb2 * D5) / h;
  out.d2 = (f0 * E0 + fa1 * E1 + fa2 * E2 + f1 * E3 + fb1 * E4 + fb2 * E5) / (h * h);
  return out;
}
