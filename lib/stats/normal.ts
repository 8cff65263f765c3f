/**
 * The standard normal distribution: CDF, log-CDF, quantile, density and log-density, each
 * accurate to a few units in the last place over the whole double range, tails included.
 *
 * Everything here is pure and throws `RangeError` for arguments outside the domain (NaN included);
 * nothing returns a silent NaN.
 */
import erfc from '@stdlib/math-base-special-erfc';
import erfcx from '@stdlib/math-base-special-erfcx';

const SQRT1_2 = Math.SQRT1_2;
/** log(sqrt(2 pi)) */
const LN_SQRT_2PI = 0.9189385332046727418;
/** 1 / sqrt(2 pi) */
const INV_SQRT_2PI = 0.3989422804014326779;
/** Veltkamp splitting constant 2^27 + 1. */
const SPLITTER = 134217729;

function assertNumber(x: number, name: string, fn: string): void {
  if (typeof x !== 'number' || Number.isNaN(x)) {
    throw new RangeError(`${fn}: ${name} must be a number, got ${String(x)}.`);
  }
}

/**
 * x^2 / 2 as an unevaluated sum hi + lo that is exact (Dekker 1971 two-product with Veltkamp
 * splitting). Used so that exp(-x^2/2) keeps full relative accuracy for |x| up to ~38, where the
 * rounding error of x*x alone would cost up to x^2 * 1.1e-16 relative.
 */
function halfSquare(x: number): [number, number] {
  const s = x * x;
  if (!Number.isFinite(s) || Math.abs(x) > 1e150) return [s / 2, 0];
  const c = SPLITTER * x;
  const hi = c - (c - x);
  const lo = x - hi;
  const e = hi * hi - s + 2 * hi * lo + lo * lo;
  return [s / 2, e / 2];
}

/** exp(-x^2/2) with full relative accuracy (see halfSquare). */
function expNegHalfSquare(x: number): number {
  const [hi, lo] = halfSquare(x);
  return Math.exp(-hi) * Math.exp(-lo);
}

/**
 * Standard normal cumulative distribution function.
 *
 * Phi(x) = (1 / sqrt(2 pi)) Int_{-inf}^{x} exp(-t^2 / 2) dt = erfc(-x / sqrt 2) / 2
 *
 * Method: for x >= -1, erfc(-x/sqrt 2)/2 (stdlib-js erfc, a port of the FreeBSD/Sun msun
 * rational approximations, ~1 ulp). For x < -1, Phi(x) = erfcx(-x/sqrt 2)/2 * exp(-x^2/2), with the
 * scaled complementary error function erfcx (stdlib-js, ~1e-16 relative) and exp(-x^2/2) computed
 * from the exact two-product x^2 = hi + lo (Dekker 1971). This keeps ~1e-15 relative accuracy down
 * to the underflow threshold (x ~ -38.5), where plain erfc(-x/sqrt 2) loses about x^2 * 1e-16
 * relative to the rounding of its argument.
 *
 * Special cases: Phi(-Infinity) = 0, Phi(Infinity) = 1; Phi(x) underflows to 0 for x < -38.5 (use
 * normalLogCdf there); NaN throws RangeError.
 *
 * @example normalCdf(-1.6448536269514722) // ~0.05
 *
 * Reference: Abramowitz, M. & Stegun, I. A. (1964), Handbook of Mathematical Functions, eq. 26.2.2
 * and 7.1.2; Dekker, T. J. (1971), "A floating-point technique for extending the available
 * precision", Numerische Mathematik 18:224-242.
 */
export function normalCdf(x: number): number {
  assertNumber(x, 'x', 'normalCdf');
  if (x === -Infinity) return 0;
  if (x === Infinity) return 1;
  if (x < -1) {
    return 0.5 * erfcx(-x * SQRT1_2) * expNegHalfSquare(x);
  }
  return 0.5 * erfc(-x * SQRT1_2);
}

/**
 * Natural logarithm of the standard normal CDF, log Phi(x).
 *
 * Method: for x < -1, log Phi(x) = log(erfcx(-x/sqrt 2)/2) - x^2/2 (the x^2/2 from the exact
 * two-product), which is the asymptotic behaviour -x^2/2 - log(-x sqrt(2 pi)) + log(1 - 1/x^2 + ...)
 * evaluated without truncating the series; accurate to ~1e-16 relative for x from -1 down to -1e150
 * and beyond. For -1 <= x <= 0, log(Phi(x)). For x > 0, log1p(-Phi(-x)) with the accurate tail
 * Phi(-x), so tiny negative values such as log Phi(10) = -7.6e-24 keep full relative accuracy.
 *
 * Special cases: -Infinity -> -Infinity; Infinity -> 0; x > 38.5 returns -0 (the true value
 * -Phi(-x) underflows); NaN throws RangeError.
 *
 * @example normalLogCdf(-40) // -804.6084420137538
 *
 * Reference: Abramowitz & Stegun (1964) eq. 7.1.2 and 26.2.12 (asymptotic expansion);
 * Dekker (1971) as for normalCdf.
 */
export function normalLogCdf(x: number): number {
  assertNumber(x, 'x', 'normalLogCdf');
  if (x === -Infinity) return -Infinity;
  if (x === Infinity) return 0;
  if (x < -1) {
    if (x < -1e150) {
      // erfcx(z) ~ 1/(z sqrt(pi)); x^2 overflows: log Phi(x) = -x^2/2 - log(-x) - log sqrt(2 pi)
      // evaluated as -(x/2)*x, still finite until |x| ~ 1.9e154.
      return -(x / 2) * x - Math.log(-x) - LN_SQRT_2PI;
    }
    const [hi, lo] = halfSquare(x);
    return Math.log(0.5 * erfcx(-x * SQRT1_2)) - hi - lo;
  }
  if (x <= 0) return Math.log(normalCdf(x));
  return Math.log1p(-normalCdf(-x));
}

// Wichura (1988), Algorithm AS 241 (PPND16), coefficients as published.
const A = [
  3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125,
  45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727,
];
const B = [
  1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867,
  39307.89580009271061, 28729.085735721942674, 5226.495278852854561,
];
const C = [
  1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504,
  1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833,
  7.7454501427834140764e-4,
];
const D = [
  1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455,
  0.14810397642748007459, 0.0151986665636164571966, 5.475938084995344946e-4,
  1.05075007164441684324e-9,
];
const E = [
  6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123,
  0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5,
  2.01033439929228813265e-7,
];
const F = [
  1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525,
  7.868691311456132591e-4, 1.8463183175100546818e-5, 1.4215117583164458887e-7,
  2.04426310338993978564e-15,
];

function poly(c: number[], x: number): number {
  let s = c[c.length - 1];
  for (let i = c.length - 2; i >= 0; i--) s = s * x + c[i];
  return s;
}

/**
 * Standard normal quantile (inverse CDF), Phi^-1(p).
 *
 * Method: Wichura's algorithm AS 241 (PPND16): a rational minimax approximation in q = p - 1/2
 * for |q| <= 0.425, and in r = sqrt(-log(min(p, 1-p))) for the tails (two pieces, r <= 5 and
 * r > 5), relative accuracy about 1e-16. Because it works from log(p) it stays accurate for
 * p down to the smallest subnormal (5e-324 -> -38.47). Note that for p close to 1 the input itself
 * carries only absolute precision 1.1e-16, so Phi^-1(1 - 1e-17) is simply Infinity's neighbour:
 * use the symmetry Phi^-1(p) = -Phi^-1(1 - p) with an accurately known 1 - p.
 *
 * Special cases: p = 0 -> -Infinity; p = 1 -> Infinity; p = 1/2 -> 0; p outside [0, 1] or NaN
 * throws RangeError.
 *
 * @example normalQuantile(0.05) // -1.6448536269514722
 *
 * Reference: Wichura, M. J. (1988), "Algorithm AS 241: The percentage points of the normal
 * distribution", Applied Statistics 37(3):477-484.
 */
export function normalQuantile(p: number): number {
  if (typeof p !== 'number' || Number.isNaN(p) || p < 0 || p > 1) {
    throw new RangeError(
      `normalQuantile: p must be a probability in [0, 1], got ${String(p)}.`,
    );
  }
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  const q = p - 0.5;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (q * poly(A, r)) / poly(B, r);
  }
  let r = q < 0 ? p : 1 - p;
  r = Math.sqrt(-Math.log(r));
  let x: number;
  if (r <= 5) {
    r -= 1.6;
    x = poly(C, r) / poly(D, r);
  } else {
    r -= 5;
    x = poly(E, r) / poly(F, r);
  }
  return q < 0 ? -x : x;
}

/**
 * Standard normal density, phi(x) = exp(-x^2/2) / sqrt(2 pi).
 *
 * Method: exp of the exact two-product x^2/2 (Dekker 1971), so the relative accuracy is ~1 ulp
 * until the result underflows (|x| > 38.6).
 *
 * Special cases: +-Infinity -> 0; NaN throws RangeError.
 *
 * @example normalPdf(0) // 0.3989422804014327
 *
 * Reference: Abramowitz & Stegun (1964) eq. 26.2.1.
 */
export function normalPdf(x: number): number {
  assertNumber(x, 'x', 'normalPdf');
  if (!Number.isFinite(x)) return 0;
  return INV_SQRT_2PI * expNegHalfSquare(x);
}

/**
 * Natural logarithm of the standard normal density, log phi(x) = -x^2/2 - log sqrt(2 pi).
 *
 * Special cases: +-Infinity -> -Infinity; NaN throws RangeError.
 *
 * @example normalLogPdf(0) // -0.9189385332046728
 *
 * Reference: Abramowitz & Stegun (1964) eq. 26.2.1.
 */
export function normalLogPdf(x: number): number {
  assertNumber(x, 'x', 'normalLogPdf');
  if (!Number.isFinite(x)) return -Infinity;
  return -(x / 2) * x - LN_SQRT_2PI;
}
