/**
 * The largest cohort the engine fits, and the sentence that refuses a larger one: the same words
 * in the engine (fit-panel.ts) and at upload (lib/ingest), so a user meets one explanation.
 */

/**
 * Largest cohort the engine fits: 10^9 obligors in one period. Up to there the likelihood is
 * checked against a 40-digit integral (tests/fixtures/engine/make_large_cohorts.py); beyond it
 * the n-sized terms of the log-integrand lose more than 1e-7 to rounding and the fit slows down,
 * so a larger count (a count cell accepts whole numbers up to 2^53) is refused with a sentence.
 */
export const MAX_OBLIGORS_PER_PERIOD = 1e9;

/**
 * Why a cohort of n obligors is refused, or null when n is within the engine's range.
 *
 * @example cohortTooLarge(2e9) // '2000000000 obligors is more than the engine handles (1e+9 per period, ...'
 * @param column the column the count came from, named in the advice (default `obligors`)
 */
export function cohortTooLarge(n: number, column = 'obligors'): string | null {
  if (!(n > MAX_OBLIGORS_PER_PERIOD)) return null;
  return `${n} obligors is more than the engine handles (${MAX_OBLIGORS_PER_PERIOD.toExponential(0)} per period, where its likelihood is checked against a 40-digit integral); no loan book has a cohort this large, so check the file (a sum of balances in the ${column} column?).`;
}
