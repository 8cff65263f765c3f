/**
 * The 21-point Gauss-Kronrod rule (G10/K21) on [-1, 1] and QUADPACK's error estimate for it.
 *
 * Nodes in increasing order; GAUSS_WEIGHTS is zero at the Kronrod-only nodes. K21 integrates
 * polynomials of degree <= 31 exactly and the embedded G10 those of degree <= 19 (checked in
 * tests/unit/stats/gauss-kronrod.test.ts against Abramowitz & Stegun, table 25.4).
 *
 * Reference: Kronrod, A. S. (1965), Nodes and Weights of Quadrature Formulas, Consultants Bureau;
 * Piessens, R., de Doncker-Kapenga, E., Uberhuber, C. W. & Kahaner, D. K. (1983), QUADPACK,
 * Springer, routine qk21 (constants and error estimate).
 */

// QUADPACK qk21: xgk (abscissae, the odd-indexed ones are the Gauss nodes), wgk, wg.
const XGK = [
  0.995657163025808080735527280689003, 0.973906528517171720077964012084452,
  0.930157491355708226001207180059508, 0.865063366688984510732096688423493,
  0.780817726586416897063717578345042, 0.679409568299024406234327365114874,
  0.562757134668604683339000099272694, 0.433395394129247190799265943165784,
  0.294392862701460198131126603103866, 0.14887433898163121088482600112972, 0,
];
const WGK = [
  0.011694638867371874278064396062192, 0.03255816230796472747881897245939,
  0.05475589657435199603138130024458, 0.07503967481091995276704314091619,
  0.093125454583697605535065465083366, 0.109387158802297641899210590325805,
  0.123491976262065851077208745199851, 0.134709217311473325928054001771707,
  0.142775938577060080797094273138717, 0.147739104901338491374841515972068,
  0.149445554002916905664936468389821,
];
const WG = [
  0.066671344308688137593568809893332, 0.149451349150580593145776339657697,
  0.219086362515982043995534934228163, 0.269266719309996355091226921569469,
  0.295524224714752870173892994651338,
];

/** Number of nodes of the rule. */
export const KRONROD_POINTS = 21;
/** The 21 Kronrod nodes on [-1, 1], increasing. */
export const KRONROD_NODES: Readonly<Float64Array> = new Float64Array(21);
/** Kronrod weights for {@link KRONROD_NODES}. */
export const KRONROD_WEIGHTS: Readonly<Float64Array> = new Float64Array(21);
/** Weights of the embedded 10-point Gauss rule at {@link KRONROD_NODES} (0 at Kronrod-only nodes). */
export const GAUSS_WEIGHTS: Readonly<Float64Array> = new Float64Array(21);
for (let j = 0; j < 10; j++) {
  (KRONROD_NODES as Float64Array)[j] = -XGK[j];
  (KRONROD_NODES as Float64Array)[20 - j] = XGK[j];
  (KRONROD_WEIGHTS as Float64Array)[j] = WGK[j];
  (KRONROD_WEIGHTS as Float64Array)[20 - j] = WGK[j];
  if (j % 2 === 1) {
    (GAUSS_WEIGHTS as Float64Array)[j] = WG[(j - 1) / 2];
    (GAUSS_WEIGHTS as Float64Array)[20 - j] = WG[(j - 1) / 2];
  }
}
(KRONROD_WEIGHTS as Float64Array)[10] = WGK[10];

/**
 * QUADPACK's error estimate of one G10/K21 panel.
 *
 * err = resasc min(1, (200 |K - G| / resasc)^1.5), floored at 50 eps K, where K and G are the
 * Kronrod and Gauss sums and resasc = Int |f - K / (b - a)| by the Kronrod rule, each already
 * multiplied by the half-width of the panel.
 *
 * Method: QUADPACK qk21 (Piessens et al. 1983), which is deliberately pessimistic: the actual
 * error of K21 on smooth integrands is usually several orders of magnitude smaller.
 *
 * Special cases: resasc = 0 or K = G gives the rounding floor; every argument must be finite
 * (not checked: this is the inner loop of the quadrature).
 *
 * @example quadpackError(1.2, 1.2000001, 0.4) // 0.4 * min(1, (200e-7 / 0.4)^1.5)
 *
 * Reference: Piessens et al. (1983), QUADPACK, qk21 (the computation of abserr).
 */
export function quadpackError(kronrod: number, gauss: number, resAsc: number): number {
  let err = Math.abs(kronrod - gauss);
  if (resAsc !== 0 && err !== 0) err = resAsc * Math.min(1, Math.pow((200 * err) / resAsc, 1.5));
  const roundoff = 50 * Number.EPSILON * Math.abs(kronrod);
  return err < roundoff ? roundoff : err;
}
