/**
 * The matrix of factor correlations between all pairs of a set of segments (the `pairs` block of
 * the engine's JSON), with the nearest correlation matrix (Higham 2002) when the pairwise
 * estimates do not form a positive semi-definite matrix.
 */
import { crossSegmentDefault, type CrossSegmentDefault } from './cross-segment-default';
import { commonWindow, factorCorrelation, pairMargin, type FactorCorrelation, type PairMargin, type PairSegmentInput } from './factor-correlation';
import { nearestCorrelation } from './nearest-correlation';
import type { Panel } from './panel';

/** One pair with what two of its obligors' joint default looks like at the fitted values. */
export type PairEntry = FactorCorrelation & { obligors: CrossSegmentDefault | null };

/** The `pairs` block. */
export interface FactorCorrelationMatrix {
  segments: string[];
  /** r of every pair (1 on the diagonal); null where a pair has no estimate. */
  matrix: (number | null)[][];
  /** Higham's nearest correlation matrix when `matrix` is complete and not PSD; else null. */
  nearest: number[][] | null;
  /** Why `nearest` is null, in a sentence (PSD already, or an entry missing). */
  nearestNote: string;
  /** The entry the nearest matrix moved most. */
  largestChange: { a: string; b: string; from: number; to: number } | null;
  smallestEigenvalue: number | null;
  entries: PairEntry[];
}

/** Most segments in one matrix (45 pairs at 10; each pair is a two-dimensional likelihood). */
export const MAX_MATRIX_SEGMENTS = 20;

/** The key of segment k's margin on a window: the same segment over the same years has one margin. */
export function marginKey(k: number, periods: readonly string[]): string {
  return `${k}|${periods.join(',')}`;
}

/** The index pairs (i < j) of n segments, in row order: the work items of a matrix. */
export function pairIndices(n: number): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) out.push([i, j]);
  return out;
}

/** Adds the joint default of two obligors at the pair's fitted values to a pair estimate. */
export function withObligors(entry: FactorCorrelation): PairEntry {
  const { a, b } = entry.margins;
  return { ...entry, obligors: entry.r !== null && a && b ? crossSegmentDefault(a.pd, a.rho, b.pd, b.rho, entry.r) : null };
}

/**
 * Assembles the `pairs` block from the pair estimates (any order; each pair of `segments` once).
 *
 * The matrix holds r of each pair; when every entry has a value its smallest eigenvalue is
 * checked and, below -1e-12, Higham's nearest correlation matrix is given beside it with the
 * entry that moved most named (pairwise estimates from different common windows and with their
 * own sampling error need not form a valid correlation matrix).
 *
 * Special cases: a pair missing or given twice throws RangeError.
 *
 * @example assembleFactorCorrelationMatrix(['A', 'B', 'C'], entries)
 *
 * Reference: Higham, N. J. (2002), IMA Journal of Numerical Analysis 22:329-343.
 */
export function assembleFactorCorrelationMatrix(segments: readonly string[], entries: readonly FactorCorrelation[]): FactorCorrelationMatrix {
  const n = segments.length;
  const index = new Map(segments.map((s, i) => [s, i]));
  const matrix: (number | null)[][] = segments.map((_, i) => segments.map((__, j) => (i === j ? 1 : null)));
  const seen = new Set<string>();
  for (const e of entries) {
    const i = index.get(e.a);
    const j = index.get(e.b);
    if (i === undefined || j === undefined) throw new RangeError(`assembleFactorCorrelationMatrix: the pair ${e.a}-${e.b} is not among the segments.`);
    const key = i < j ? `${i},${j}` : `${j},${i}`;
    if (seen.has(key)) throw new RangeError(`assembleFactorCorrelationMatrix: the pair ${e.a}-${e.b} is given twice.`);
    seen.add(key);
    matrix[i][j] = e.r;
    matrix[j][i] = e.r;
  }
  if (seen.size !== (n * (n - 1)) / 2) throw new RangeError(`assembleFactorCorrelationMatrix: expected ${(n * (n - 1)) / 2} pairs, got ${seen.size}.`);
  const ordered = pairIndices(n).map(([i, j]) => entries.find((e) => (index.get(e.a) === i && index.get(e.b) === j) || (index.get(e.a) === j && index.get(e.b) === i))!);
  const base = { segments: segments.slice(), matrix, entries: ordered.map(withObligors) };
  const missing = ordered.filter((e) => e.r === null);
  if (missing.length > 0) {
    return {
      ...base,
      nearest: null,
      nearestNote: `The matrix is incomplete (${missing.map((e) => `${e.a}-${e.b}`).join(', ')} ${missing.length === 1 ? 'has' : 'have'} no estimate), so its nearest correlation matrix is not computed.`,
      largestChange: null,
      smallestEigenvalue: null,
    };
  }
  const near = nearestCorrelation(matrix as number[][]);
  if (near.distance === 0) {
    return { ...base, nearest: null, nearestNote: 'The pairwise estimates form a valid (positive semi-definite) correlation matrix.', largestChange: null, smallestEigenvalue: near.smallestEigenvalue };
  }
  const lc = near.largestChange;
  return {
    ...base,
    nearest: near.matrix,
    nearestNote: `The pairwise estimates do not form a valid correlation matrix (smallest eigenvalue ${near.smallestEigenvalue.toFixed(4)}); the nearest one (Higham 2002) moves ${segments[lc.i]}-${segments[lc.j]} most, from ${lc.from.toFixed(3)} to ${lc.to.toFixed(3)}.`,
    largestChange: { a: segments[lc.i], b: segments[lc.j], from: lc.from, to: lc.to },
    smallestEigenvalue: near.smallestEigenvalue,
  };
}

/**
 * Every pair of `inputs` by factorCorrelation in this thread, assembled (the engine spreads the
 * pairs over worker threads instead and assembles them the same way). Each segment's margin on a
 * window is computed once and shared by the pairs over that window.
 *
 * Special cases: fewer than 2 or more than MAX_MATRIX_SEGMENTS segments, or a name given twice,
 * throw RangeError with a sentence.
 *
 * @example factorCorrelationMatrix([a, b, c], { level: 0.95 })
 */
export function factorCorrelationMatrix(inputs: readonly PairSegmentInput[], options: { level?: number } = {}): FactorCorrelationMatrix {
  if (inputs.length < 2) throw new RangeError('factorCorrelationMatrix: give at least two segments.');
  if (inputs.length > MAX_MATRIX_SEGMENTS) throw new RangeError(`factorCorrelationMatrix: at most ${MAX_MATRIX_SEGMENTS} segments; got ${inputs.length}.`);
  const names = inputs.map((i) => i.segment);
  if (new Set(names).size !== names.length) throw new RangeError('factorCorrelationMatrix: each segment may be given only once.');
  const margins = new Map<string, PairMargin>();
  const entries = pairIndices(inputs.length).map(([i, j]) => {
    const w = commonWindow(inputs[i], inputs[j]);
    if (w.periods.length < 3) return factorCorrelation(inputs[i], inputs[j], options);
    const margin = (k: number, panel: Panel): PairMargin => {
      const key = marginKey(k, w.periods);
      let m = margins.get(key);
      if (m === undefined) {
        m = pairMargin(inputs[k].segment, panel, w.periods);
        margins.set(key, m);
      }
      return m;
    };
    return factorCorrelation(inputs[i], inputs[j], { ...options, margins: { a: margin(i, w.a), b: margin(j, w.b) } });
  });
  return assembleFactorCorrelationMatrix(names, entries);
}
