/**
 * A seeded, deterministic random generator for simulation and bootstrap: Mersenne Twister
 * uniforms, Marsaglia polar normals, and exact binomial draws (inversion for small means, BTPE
 * otherwise) that stay O(1) for n in the millions.
 *
 * Same seed, same stream, on every platform: all arithmetic is 32-bit integer (Math.imul) or IEEE
 * double with deterministic operations (log, sqrt, exp, floor).
 */

/** A seeded random stream. */
export interface Rng {
  /** Uniform on [0, 1) with 53 random bits (MT19937 genrand_res53). */
  uniform(): number;
  /** Standard normal deviate (Marsaglia polar method). */
  normal(): number;
  /** Binomial(n, p) deviate, exact (inversion or BTPE). */
  binomial(n: number, p: number): number;
  /** The seed this stream was created with. */
  readonly seed: number;
}

const N = 624;
const M = 397;
const UPPER_MASK = 0x80000000;
const LOWER_MASK = 0x7fffffff;
const MATRIX_A = 0x9908b0df;

/**
 * MT19937, the 32-bit Mersenne Twister: init_genrand seeding and tempered output exactly as in the
 * authors' reference implementation (mt19937ar.c, 2002).
 */
class MersenneTwister {
  private readonly mt = new Uint32Array(N);
  private mti = N + 1;

  constructor(seed: number) {
    const mt = this.mt;
    mt[0] = seed >>> 0;
    for (let i = 1; i < N; i++) {
      const prev = mt[i - 1] ^ (mt[i - 1] >>> 30);
      mt[i] = (Math.imul(1812433253, prev) + i) >>> 0;
    }
    this.mti = N;
  }

  nextUint32(): number {
    const mt = this.mt;
    let y: number;
    if (this.mti >= N) {
      let kk = 0;
      for (; kk < N - M; kk++) {
        y = (mt[kk] & UPPER_MASK) | (mt[kk + 1] & LOWER_MASK);
        mt[kk] = mt[kk + M] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      }
      for (; kk < N - 1; kk++) {
        y = (mt[kk] & UPPER_MASK) | (mt[kk + 1] & LOWER_MASK);
        mt[kk] = mt[kk + (M - N)] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      }
      y = (mt[N - 1] & UPPER_MASK) | (mt[0] & LOWER_MASK);
      mt[N - 1] = mt[M - 1] ^ (y >>> 1) ^ (y & 1 ? MATRIX_A : 0);
      this.mti = 0;
    }
    y = mt[this.mti++];
    y ^= y >>> 11;
    y ^= (y << 7) & 0x9d2c5680;
    y ^= (y << 15) & 0xefc60000;
    y ^= y >>> 18;
    return y >>> 0;
  }

  /** genrand_res53: (a * 2^26 + b) / 2^53 with a = 27 and b = 26 high bits of two outputs. */
  nextDouble(): number {
    const a = this.nextUint32() >>> 5;
    const b = this.nextUint32() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }
}

/**
 * The raw MT19937 stream: 32-bit outputs (genrand_int32) and 53-bit doubles (genrand_res53) from
 * init_genrand(seed). Exposed so that the generator can be checked against the reference
 * implementation; simulation code should use createRng.
 *
 * @example createMt19937(5489).nextUint32() // 3499211612 (the reference first output)
 *
 * Reference: Matsumoto & Nishimura (1998); mt19937ar.c (2002).
 */
export function createMt19937(seed: number): { nextUint32(): number; nextDouble(): number } {
  assertSeed('createMt19937', seed);
  const mt = new MersenneTwister(seed);
  return { nextUint32: () => mt.nextUint32(), nextDouble: () => mt.nextDouble() };
}

function assertSeed(fn: string, seed: number): void {
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) {
    throw new RangeError(
      `${fn}: seed must be an integer in [0, 4294967295], got ${String(seed)}.`,
    );
  }
}

/**
 * Derive the seed of sub-stream `index` from a master seed, so that replication i of a bootstrap
 * or simulation has its own reproducible stream whatever the number of threads.
 *
 * z = fmix32(seed + g);  seed_i = fmix32(z XOR ((index + 1) g mod 2^32)),  g = 0x9e3779b9
 * (two rounds of the 32-bit MurmurHash3 finaliser over a golden-ratio Weyl step, as in SplitMix;
 * indices of 2^32 and above get a third round with their high word).
 *
 * Method: fmix32 is a bijection of 32-bit integers with full avalanche, so distinct (seed, index)
 * pairs give well-spread seeds; MT19937's init_genrand then decorrelates nearby seeds.
 *
 * Special cases: seed must be an integer in [0, 2^32) and index a non-negative safe integer,
 * otherwise RangeError.
 *
 * @example deriveSeed(7, 0) // a fixed 32-bit integer
 *
 * Reference: Steele, G. L., Lea, D. & Flood, C. H. (2014), "Fast splittable pseudorandom number
 * generators", OOPSLA '14, 453-472 (SplitMix); Appleby, A. (2011), MurmurHash3, fmix32.
 */
export function deriveSeed(seed: number, index: number): number {
  assertSeed('deriveSeed', seed);
  if (!Number.isSafeInteger(index) || index < 0) {
    throw new RangeError(`deriveSeed: index must be a non-negative integer, got ${String(index)}.`);
  }
  const lo = index >>> 0;
  const hi = Math.floor(index / 4294967296) >>> 0;
  let z = fmix32((seed + 0x9e3779b9) >>> 0);
  z = fmix32((z ^ Math.imul(lo + 1, 0x9e3779b9)) >>> 0);
  if (hi !== 0) z = fmix32((z ^ Math.imul(hi, 0x85ebca6b)) >>> 0);
  return z;
}

function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/**
 * Binomial deviate by sequential inversion from 0 upwards, for n * p < 30 (p <= 1/2).
 * Expected cost O(1 + np). Kachitvichyanukul & Schmeiser (1988), algorithm BINV.
 */
function binomialInversion(n: number, p: number, uniform: () => number): number {
  const q = 1 - p;
  const qn = Math.exp(n * Math.log1p(-p));
  const np = n * p;
  const bound = Math.min(n, np + 10 * Math.sqrt(np * q + 1));
  const ratio = p / q;
  for (;;) {
    let x = 0;
    let px = qn;
    let u = uniform();
    while (u > px) {
      x++;
      if (x > bound) break;
      u -= px;
      px *= ((n - x + 1) * ratio) / x;
    }
    if (x <= bound) return x;
    // Ran past the bound (probability below 1e-20 or rounding in u): restart with a fresh uniform.
  }
}

/**
 * Binomial deviate by BTPE (triangle, parallelogram, exponential tails), for n * p >= 30 and
 * p <= 1/2; exact acceptance-rejection with expected cost O(1) for any n.
 * Kachitvichyanukul & Schmeiser (1988), algorithm BTPE, steps 0-5.3.
 */
function binomialBtpe(n: number, p: number, uniform: () => number): number {
  const r = p;
  const q = 1 - r;
  const fm = n * r + r;
  const m = Math.floor(fm);
  const nrq = n * r * q;
  const p1 = Math.floor(2.195 * Math.sqrt(nrq) - 4.6 * q) + 0.5;
  const xm = m + 0.5;
  const xl = xm - p1;
  const xr = xm + p1;
  const c = 0.134 + 20.5 / (15.3 + m);
  let a = (fm - xl) / (fm - xl * r);
  const laml = a * (1 + a / 2);
  a = (xr - fm) / (xr * q);
  const lamr = a * (1 + a / 2);
  const p2 = p1 * (1 + 2 * c);
  const p3 = p2 + c / laml;
  const p4 = p3 + c / lamr;

  for (;;) {
    // Step 1: triangular region.
    const u = uniform() * p4;
    let v = uniform();
    let y: number;
    if (u <= p1) {
      return Math.floor(xm - p1 * v + u);
    }
    if (u <= p2) {
      // Step 2: parallelograms.
      const x = xl + (u - p1) / c;
      v = v * c + 1 - Math.abs(m - x + 0.5) / p1;
      if (v > 1) continue;
      y = Math.floor(x);
    } else if (u <= p3) {
      // Step 3: left exponential tail.
      y = Math.floor(xl + Math.log(v) / laml);
      if (y < 0) continue;
      v = v * (u - p2) * laml;
    } else {
      // Step 4: right exponential tail.
      y = Math.floor(xr - Math.log(v) / lamr);
      if (y > n) continue;
      v = v * (u - p3) * lamr;
    }
    // Step 5: acceptance test.
    const k = Math.abs(y - m);
    if (k <= 20 || k >= nrq / 2 - 1) {
      // Step 5.1: explicit evaluation of f(y) / f(m) by recursion.
      const s = r / q;
      const aa = s * (n + 1);
      let f = 1;
      if (m < y) {
        for (let i = m + 1; i <= y; i++) f *= aa / i - s;
      } else if (m > y) {
        for (let i = y + 1; i <= m; i++) f /= aa / i - s;
      }
      if (v <= f) return y;
      continue;
    }
    // Step 5.2: squeeze using upper and lower bounds on log(f(y)).
    const rho = (k / nrq) * ((k * (k / 3 + 0.625) + 0.1666666666666) / nrq + 0.5);
    const t = (-k * k) / (2 * nrq);
    const alv = Math.log(v);
    if (alv < t - rho) return y;
    if (alv > t + rho) continue;
    // Step 5.3: final acceptance/rejection with Stirling's formula.
    const x1 = y + 1;
    const f1 = m + 1;
    const z = n + 1 - m;
    const w = n - y + 1;
    const x2 = x1 * x1;
    const f2 = f1 * f1;
    const z2 = z * z;
    const w2 = w * w;
    const bound =
      xm * Math.log(f1 / x1) +
      (n - m + 0.5) * Math.log(z / w) +
      (y - m) * Math.log((w * r) / (x1 * q)) +
      (13860 - (462 - (132 - (99 - 140 / f2) / f2) / f2) / f2) / f1 / 166320 +
      (13860 - (462 - (132 - (99 - 140 / z2) / z2) / z2) / z2) / z / 166320 +
      (13860 - (462 - (132 - (99 - 140 / x2) / x2) / x2) / x2) / x1 / 166320 +
      (13860 - (462 - (132 - (99 - 140 / w2) / w2) / w2) / w2) / w / 166320;
    if (alv <= bound) return y;
  }
}

/**
 * Create a seeded random stream.
 *
 * Method:
 * - uniform(): MT19937 (Matsumoto & Nishimura 1998), seeded with init_genrand(seed); doubles by
 *   genrand_res53, so the stream equals the reference mt19937ar.c (and NumPy's legacy
 *   RandomState(seed).random_sample()).
 * - normal(): Marsaglia & Bray (1964) polar method: draw (v1, v2) uniform in the unit disc,
 *   s = v1^2 + v2^2, return v1 sqrt(-2 log s / s) and keep v2 sqrt(-2 log s / s) for the next call.
 * - binomial(n, p): exact. With r = min(p, 1 - p): inversion (BINV) when n r < 30, otherwise BTPE
 *   (Kachitvichyanukul & Schmeiser 1988); the count is reflected (n - X) when p > 1/2. No normal
 *   approximation is used at any n.
 *
 * Special cases: binomial(0, p) = 0, binomial(n, 0) = 0, binomial(n, 1) = n; n must be a
 * non-negative safe integer and p in [0, 1], otherwise RangeError. seed must be an integer in
 * [0, 2^32), otherwise RangeError.
 *
 * @example const rng = createRng(7); rng.uniform(); rng.normal(); rng.binomial(1_000_000, 0.002);
 *
 * Reference: Matsumoto, M. & Nishimura, T. (1998), "Mersenne Twister: a 623-dimensionally
 * equidistributed uniform pseudo-random number generator", ACM TOMACS 8(1):3-30; Marsaglia, G. &
 * Bray, T. A. (1964), "A convenient method for generating normal variables", SIAM Review
 * 6(3):260-264; Kachitvichyanukul, V. & Schmeiser, B. W. (1988), "Binomial random variate
 * generation", Communications of the ACM 31(2):216-222.
 */
export function createRng(seed: number): Rng {
  assertSeed('createRng', seed);
  const mt = new MersenneTwister(seed);
  const uniform = (): number => mt.nextDouble();
  let spare = 0;
  let hasSpare = false;

  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let v1: number;
    let v2: number;
    let s: number;
    do {
      v1 = 2 * uniform() - 1;
      v2 = 2 * uniform() - 1;
      s = v1 * v1 + v2 * v2;
    } while (s >= 1 || s === 0);
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v2 * f;
    hasSpare = true;
    return v1 * f;
  };

  const binomial = (n: number, p: number): number => {
    if (!Number.isSafeInteger(n) || n < 0) {
      throw new RangeError(`binomial: n must be a non-negative integer, got ${String(n)}.`);
    }
    if (typeof p !== 'number' || Number.isNaN(p) || p < 0 || p > 1) {
      throw new RangeError(`binomial: p must be a probability in [0, 1], got ${String(p)}.`);
    }
    if (n === 0 || p === 0) return 0;
    if (p === 1) return n;
    const flip = p > 0.5;
    const r = flip ? 1 - p : p;
    const x = n * r < 30 ? binomialInversion(n, r, uniform) : binomialBtpe(n, r, uniform);
    return flip ? n - x : x;
  };

  return { uniform, normal, binomial, seed };
}
