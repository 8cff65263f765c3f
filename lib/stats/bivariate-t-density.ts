/**
 * The standard bivariate Student-t density (location 0, unit scales, correlation rho, nu degrees
 * of freedom) and its level sets: the latent pair of two obligors under the t copula.
 */

function assertShape(fn: string, rho: number, nu: number): void {
  if (!(rho > -1 && rho < 1)) throw new RangeError(`${fn}: the correlation rho must lie strictly between -1 and 1; got ${rho}.`);
  if (!(nu > 0)) throw new RangeError(`${fn}: the degrees of freedom nu must be positive (Infinity for the bivariate normal); got ${nu}.`);
}

/**
 * Density of the standard bivariate t with correlation rho and nu degrees of freedom at (x, y):
 *
 *   f(x, y) = 1 / (2 pi sqrt(1 - rho^2)) (1 + Q / nu)^(-(nu + 2) / 2),
 *   Q = (x^2 - 2 rho x y + y^2) / (1 - rho^2),
 *
 * the general constant Gamma((nu + d) / 2) / (Gamma(nu / 2) (nu pi)^(d / 2) |R|^(1/2)) with d = 2,
 * where Gamma(nu / 2 + 1) / Gamma(nu / 2) = nu / 2 leaves 1 / (2 pi sqrt(1 - rho^2)).
 *
 * Method: the power as exp(-(nu + 2) / 2 log1p(Q / nu)), which keeps its digits for large nu.
 *
 * Special cases: nu = Infinity is the standard bivariate normal density exp(-Q / 2) / (2 pi
 * sqrt(1 - rho^2)); rho outside (-1, 1), nu not positive or a non-finite point throw RangeError.
 *
 * @example bivariateTDensity(0, 0, 0.3, 4) // 1 / (2 pi sqrt(0.91)) = 0.16684
 *
 * Reference: Kotz, S. & Nadarajah, S. (2004), Multivariate t Distributions and Their
 * Applications, eq. (1.1); McNeil, Frey & Embrechts (2015), Quantitative Risk Management, 2nd ed.,
 * section 6.2 (the multivariate t as a normal variance mixture).
 */
export function bivariateTDensity(x: number, y: number, rho: number, nu: number): number {
  assertShape('bivariateTDensity', rho, nu);
  if (!Number.isFinite(x) || !Number.isFinite(y)) throw new RangeError(`bivariateTDensity: the point must be finite; got (${x}, ${y}).`);
  const oneMinus = 1 - rho * rho;
  const q = (x * x - 2 * rho * x * y + y * y) / oneMinus;
  const norm = 1 / (2 * Math.PI * Math.sqrt(oneMinus));
  if (nu === Number.POSITIVE_INFINITY) return norm * Math.exp(-q / 2);
  return norm * Math.exp((-(nu + 2) / 2) * Math.log1p(q / nu));
}

/**
 * The level set of the standard bivariate t density that encloses probability q: the ellipse
 * x^2 - 2 rho x y + y^2 = c^2 (1 - rho^2) with P(Q <= c^2) = q. Q / 2 follows the F law with 2 and
 * nu degrees of freedom, whose distribution function is 1 - (1 + c^2 / nu)^(-nu / 2), so
 *
 *   c^2 = nu ((1 - q)^(-2 / nu) - 1),
 *
 * and in coordinates turned by 45 degrees the semi-axes are c sqrt(1 + rho) along the diagonal and
 * c sqrt(1 - rho) across it (as for the normal, whose c^2 = -2 ln(1 - q) is the limit nu -> Infinity).
 *
 * Method: c^2 = nu expm1(-(2 / nu) log1p(-q)), exact to rounding for every nu.
 *
 * Special cases: nu = Infinity gives the normal ellipse; q outside (0, 1), rho outside (-1, 1) or
 * nu not positive throw RangeError.
 *
 * @example bivariateTContour(0, 4, 0.95).alongDiagonal // sqrt(4 (0.05^-0.5 - 1)) = 2.9907
 *
 * Reference: Kotz & Nadarajah (2004), section 1.2 (Q / d is F(d, nu)); Johnson, Kotz &
 * Balakrishnan (1995), Continuous Univariate Distributions vol. 2, ch. 27 (the F law).
 */
export function bivariateTContour(rho: number, nu: number, q: number): { alongDiagonal: number; acrossDiagonal: number } {
  assertShape('bivariateTContour', rho, nu);
  if (!(q > 0 && q < 1)) throw new RangeError(`bivariateTContour: the enclosed probability q must lie strictly between 0 and 1; got ${q}.`);
  const c2 = nu === Number.POSITIVE_INFINITY ? -2 * Math.log1p(-q) : nu * Math.expm1((-2 / nu) * Math.log1p(-q));
  const c = Math.sqrt(c2);
  return { alongDiagonal: c * Math.sqrt(1 + rho), acrossDiagonal: c * Math.sqrt(1 - rho) };
}
