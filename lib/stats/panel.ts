/**
 * A default panel, the input of every estimator: for each period t = 1..T the obligors n_t
 * performing at its start and the defaults d_t during it (DESIGN.md, "Estimators").
 */

/** A default panel: obligors at the start of each period and defaults during it. */
export interface Panel {
  obligors: readonly number[];
  defaults: readonly number[];
}

/**
 * Checks a panel and throws RangeError naming the first bad period (1-based).
 *
 * Every period needs a whole number of obligors n_t >= 1 and of defaults 0 <= d_t <= n_t, both
 * safe integers (below 2^53); the two arrays must have the same, non-zero length.
 *
 * @example assertPanel({ obligors: [100, 120], defaults: [1, 130] }, 'vasicekMle') // RangeError naming period 2
 */
export function assertPanel(panel: Panel, fn: string): void {
  const { obligors, defaults } = panel;
  if (!Array.isArray(obligors) || !Array.isArray(defaults)) {
    throw new RangeError(`${fn}: the panel needs arrays of obligors and defaults.`);
  }
  if (obligors.length !== defaults.length) {
    throw new RangeError(
      `${fn}: obligors has ${obligors.length} periods but defaults has ${defaults.length}; give one of each per period.`,
    );
  }
  if (obligors.length === 0) throw new RangeError(`${fn}: the panel has no periods.`);
  for (let t = 0; t < obligors.length; t++) {
    const n = obligors[t];
    const d = defaults[t];
    if (!Number.isSafeInteger(n) || n < 1) {
      throw new RangeError(`${fn}: period ${t + 1} has obligors = ${n}; it must be a positive whole number.`);
    }
    if (!Number.isSafeInteger(d) || d < 0 || d > n) {
      throw new RangeError(
        `${fn}: period ${t + 1} has defaults = ${d} with obligors = ${n}; defaults must be a whole number from 0 to obligors.`,
      );
    }
  }
}
