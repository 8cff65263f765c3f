/**
 * The maximum of a function of one variable on a closed interval that may have its maximum at an
 * end or more than one local maximum: a grid first, then Brent's search around the best point.
 */
import { brentMinimize } from './brent';

/** Result of {@link gridMaximize}. */
export interface GridMaximum {
  x: number;
  value: number;
  /** Brent's search met its tolerance (true when the best grid point is an end and stays best). */
  converged: boolean;
  /** The function at each grid point (for a profile's shape, e.g. whether it is flat). */
  grid: { x: number; value: number }[];
}

/** Options of {@link gridMaximize}. */
export interface GridMaximizeOptions {
  /**
   * A cheaper stand-in for f(probe) at the probe next to the best end (see gridMaximize), on the
   * same side of f(end) as f(probe): for a profile, the function with its inner parameters held at
   * their maximum at the end, which differs from f(probe) only in the second order of the probe's
   * tiny step (envelope theorem) and is never above it. Absent, or returning undefined: f itself.
   */
  endProbe?: (end: number, probe: number) => number | undefined;
}

/**
 * Maximises f on [grid[0], grid[last]]: evaluates f at every grid point (ascending, the ends
 * included), then runs Brent's localmin on -f between the neighbours of the best grid point, and
 * keeps whichever of the grid's best and Brent's point is higher. The ends are candidates of their
 * own, so a maximum on a bound (rho = 0, 1/nu = 0) is found exactly: when the best grid point is an
 * end and f is lower a thousandth of the way to the next grid point, the end is the maximum and no
 * search follows (Brent's golden steps would otherwise crawl towards the end).
 *
 * Method: Brent (1973), ch. 5 (localmin) with absolute tolerance `tolerance` (default 1e-7).
 *
 * Special cases: fewer than two grid points, a grid that is not strictly ascending or a value that
 * is NaN throw RangeError; -Infinity is a valid (worst) value.
 *
 * @example gridMaximize((x) => -(x - 0.3) ** 2, [0, 0.5, 1]).x // 0.3
 *
 * Reference: Brent, R. P. (1973), Algorithms for Minimization without Derivatives, ch. 5.
 */
export function gridMaximize(
  f: (x: number) => number,
  grid: readonly number[],
  tolerance = 1e-7,
  options: GridMaximizeOptions = {},
): GridMaximum {
  if (grid.length < 2) throw new RangeError('gridMaximize: the grid needs at least two points.');
  for (let i = 1; i < grid.length; i++) {
    if (!(grid[i] > grid[i - 1])) throw new RangeError(`gridMaximize: the grid must be strictly ascending; point ${i} is ${grid[i]} after ${grid[i - 1]}.`);
  }
  const values = grid.map((x) => {
    const v = f(x);
    if (Number.isNaN(v)) throw new RangeError(`gridMaximize: the function is NaN at ${x}.`);
    return v;
  });
  let best = 0;
  for (let i = 1; i < grid.length; i++) if (values[i] > values[best]) best = i;
  const table = grid.map((x, i) => ({ x, value: values[i] }));
  const last = grid.length - 1;
  if (best === 0 || best === last) {
    // At an end: a probe a thousandth of the way to the next grid point decides whether the
    // maximum is the end itself (the function falls into the interval) before any search.
    const end = grid[best];
    const probe = end + 1e-3 * (grid[best === 0 ? 1 : last - 1] - end);
    const atProbe = options.endProbe?.(end, probe) ?? f(probe);
    if (atProbe <= values[best]) return { x: end, value: values[best], converged: true, grid: table };
  }
  const lo = grid[Math.max(0, best - 1)];
  const hi = grid[Math.min(grid.length - 1, best + 1)];
  const r = brentMinimize((x) => -f(x), lo, hi, { tolerance });
  if (-r.fValue > values[best]) return { x: r.value, value: -r.fValue, converged: r.converged, grid: table };
  return { x: grid[best], value: values[best], converged: true, grid: table };
}
