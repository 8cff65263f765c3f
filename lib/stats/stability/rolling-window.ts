/**
 * Rolling-window estimates of rho (DESIGN.md, `stability.rolling`:
 * `{ window, entries: [ { from, to, rho, lower, upper } ] }`, binomialMle with its profile interval).
 */
import { binomialMleWithProfile } from '../estimators/binomial-mle';
import type { EstimateStatus } from '../estimators/types';
import { profileInterval } from '../intervals/profile';
import { assertLabelledPanel, type LabelledPanel } from './jackknife';

/** Default window length in periods (years). */
export const DEFAULT_ROLLING_WINDOW = 10;

/** One window. rho, lower and upper are null when binomialMle has no estimate there (with status and reason). */
export interface RollingEntry {
  /** First and last period label of the window. */
  from: string;
  to: string;
  rho: number | null;
  lower: number | null;
  upper: number | null;
  status: EstimateStatus;
  reason?: string;
}

/** Result of {@link rollingWindow}. */
export interface RollingWindow {
  status: 'ok';
  window: number;
  level: number;
  entries: RollingEntry[];
}

/** The panel is shorter than the window. */
export interface RollingWindowUndefined {
  status: 'undefined';
  window: number;
  reason: string;
}

/**
 * binomialMle and its profile-likelihood interval on every window of `window` consecutive periods.
 *
 * Entries for the windows starting at periods 1, 2, ..., T - window + 1: rho and the interval
 * { rho : l*(rho) >= l*(rho_hat) - chi2_1(level) / 2 } of binomialMle on that window alone
 * (intervals/profile.ts).
 *
 * Method: binomialMleWithProfile and profileInterval per window (T - window + 1 fits).
 *
 * Special cases: a panel shorter than the window gives status `undefined` with a sentence; a
 * window where binomialMle has no estimate (no default in it) gives nulls with its status and
 * reason; a `not-converged` fit keeps its value for inspection with null interval ends. window not
 * a whole number from 2 to 1000, level outside (0, 1), or an invalid panel throw RangeError.
 *
 * @example rollingWindow({ periods, obligors, defaults }, { window: 10 })
 *
 * Reference: Gordy & Heitfield (2002) for the estimator; Venzon & Moolgavkar (1988) for the interval.
 */
export function rollingWindow(
  panel: LabelledPanel,
  options: { window?: number; level?: number } = {},
): RollingWindow | RollingWindowUndefined {
  assertLabelledPanel(panel, 'rollingWindow');
  const window = options.window ?? DEFAULT_ROLLING_WINDOW;
  const level = options.level ?? 0.95;
  if (!Number.isInteger(window) || window < 2 || window > 1000) {
    throw new RangeError(`rollingWindow: the window must be a whole number of periods from 2 to 1000; got ${window}.`);
  }
  if (!(level > 0 && level < 1)) throw new RangeError(`rollingWindow: the level must be strictly between 0 and 1; got ${level}.`);
  const T = panel.obligors.length;
  if (T < window) {
    return { status: 'undefined', window, reason: `A rolling window of ${window} periods needs at least ${window}; this panel has ${T}.` };
  }
  const entries: RollingEntry[] = [];
  for (let i = 0; i + window <= T; i++) {
    const part = { obligors: panel.obligors.slice(i, i + window), defaults: panel.defaults.slice(i, i + window) };
    const from = String(panel.periods[i]);
    const to = String(panel.periods[i + window - 1]);
    const { result, profile } = binomialMleWithProfile(part);
    if (result.rho === null || profile === null) {
      entries.push({ from, to, rho: null, lower: null, upper: null, status: result.status, reason: result.reason });
      continue;
    }
    if (result.status === 'not-converged') {
      entries.push({ from, to, rho: result.rho, lower: null, upper: null, status: result.status, reason: result.reason });
      continue;
    }
    const iv = profileInterval(profile, result, level);
    if (!iv.converged) {
      entries.push({ from, to, rho: result.rho, lower: null, upper: null, status: 'not-converged', reason: 'The search for an end of the profile interval did not converge.' });
      continue;
    }
    entries.push({
      from,
      to,
      rho: result.rho,
      lower: iv.lower,
      upper: iv.upperAtSearchLimit ? 1 : iv.upper,
      status: result.status,
      ...(result.reason ? { reason: result.reason } : {}),
    });
  }
  return { status: 'ok', window, level, entries };
}
