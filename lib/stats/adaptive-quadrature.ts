/**
 * Globally adaptive Gauss-Kronrod quadrature of a smooth function on a finite interval (QUADPACK's
 * qag with the 21-point rule): for bounded, smooth integrands that are not log-concave spikes
 * (those go to log-concave-integral.ts).
 */
import { GAUSS_WEIGHTS, KRONROD_NODES, KRONROD_POINTS, KRONROD_WEIGHTS, quadpackError } from './gauss-kronrod';

/** Most panels of one integral. */
const MAX_PANELS = 200;

/** Result of {@link adaptiveIntegral}. */
export interface AdaptiveIntegral {
  value: number;
  /** The error estimate met the tolerance. */
  converged: boolean;
  /** QUADPACK's error estimate (absolute). */
  error: number;
  panels: number;
}

/**
 * Int_a^b f(x) dx by globally adaptive G10/K21.
 *
 * Method: QUADPACK qag (Piessens et al. 1983): the panel with the largest error estimate is
 * bisected until the total estimate is below max(absoluteTolerance, relativeTolerance |I|) or
 * 200 panels are used; K21 exact for polynomials of degree 31.
 *
 * Special cases: a > b or a non-finite end throws RangeError; f returning NaN throws RangeError.
 *
 * @example adaptiveIntegral((x) => Math.exp(-x), 0, 30).value // 1 - e^-30
 *
 * Reference: Piessens, R., de Doncker-Kapenga, E., Uberhuber, C. W. & Kahaner, D. K. (1983),
 * QUADPACK, Springer, routines qk21 and qag.
 */
export function adaptiveIntegral(
  f: (x: number) => number,
  a: number,
  b: number,
  options: { relativeTolerance?: number; absoluteTolerance?: number } = {},
): AdaptiveIntegral {
  if (!Number.isFinite(a) || !Number.isFinite(b) || !(a <= b)) throw new RangeError(`adaptiveIntegral: the interval must be finite with a <= b; got [${a}, ${b}].`);
  const rel = options.relativeTolerance ?? 1e-10;
  const abs = options.absoluteTolerance ?? 0;
  if (a === b) return { value: 0, converged: true, error: 0, panels: 0 };
  const panels: { a: number; b: number; value: number; error: number }[] = [];
  const rule = (lo: number, hi: number) => {
    const half = 0.5 * (hi - lo);
    const centre = 0.5 * (hi + lo);
    const fv = new Float64Array(KRONROD_POINTS);
    let k = 0;
    let g = 0;
    for (let j = 0; j < KRONROD_POINTS; j++) {
      const v = f(centre + half * KRONROD_NODES[j]);
      if (Number.isNaN(v)) throw new RangeError(`adaptiveIntegral: the integrand is NaN at ${centre + half * KRONROD_NODES[j]}.`);
      fv[j] = v;
      k += KRONROD_WEIGHTS[j] * v;
      g += GAUSS_WEIGHTS[j] * v;
    }
    const mean = 0.5 * k;
    let asc = 0;
    for (let j = 0; j < KRONROD_POINTS; j++) asc += KRONROD_WEIGHTS[j] * Math.abs(fv[j] - mean);
    panels.push({ a: lo, b: hi, value: k * half, error: quadpackError(k * half, g * half, asc * half) });
  };
  rule(a, b);
  for (;;) {
    let value = 0;
    let error = 0;
    let worst = 0;
    for (let i = 0; i < panels.length; i++) {
      value += panels[i].value;
      error += panels[i].error;
      if (panels[i].error > panels[worst].error) worst = i;
    }
    const target = Math.max(abs, rel * Math.abs(value));
    if (error <= target || panels.length >= MAX_PANELS) return { value, converged: error <= target, error, panels: panels.length };
    const p = panels[worst];
    const mid = 0.5 * (p.a + p.b);
    if (!(mid > p.a && mid < p.b)) return { value, converged: false, error, panels: panels.length };
    panels.splice(worst, 1);
    rule(p.a, mid);
    rule(mid, p.b);
  }
}
