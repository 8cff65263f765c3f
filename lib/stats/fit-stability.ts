/**
 * The stability block of a segment fit (DESIGN.md `stability.{jackknife,breakTest,rolling}`):
 * the leave-one-year-out jackknife of the independent model's estimators, the sup-LR break test
 * (its bootstrap planned here and run by the caller, on worker threads in lib/engine) and the
 * rolling window of binomialMle with its profile interval.
 */
import type { FitWarning } from './fit-warnings';
import type { BreakTestDto, Stability } from './fit-result';
import type { SimulationModel } from './simulation-spec';
import type { StageTimer } from './stage-timer';
import { BREAK_MIN_SIDE, summariseBreakTest, supLrStatistic, type BreakReplication, type SupLr } from './stability/break-test';
import { jackknife, type LabelledPanel } from './stability/jackknife';
import { rollingWindow } from './stability/rolling-window';

/** Level below which the break test raises the `structural-break` warning. */
export const BREAK_TEST_LEVEL = 0.05;

/** What the stability block is asked to do. */
export interface StabilityOptions {
  /** Length of the rolling window in periods (default 10). */
  rollingWindow?: number;
  /** Bootstrap of the break test's p-value: B replications and the master seed; null or absent: the statistic only. */
  breakTest?: { replications: number; seed: number } | null;
}

/** The break test's bootstrap left to run: B panels under the fitted no-break model. */
export interface BreakTestPlan {
  spec: SimulationModel;
  replications: number;
  observed: SupLr;
}

/** The sentence of a break test without a bootstrap. */
export const NO_BREAK_P_VALUE =
  'No p-value: the largest likelihood-ratio statistic over the split years is not chi-square distributed (Andrews 1993), so its p-value needs a parametric bootstrap; ask for one (in the new-fit form, the p-value of the break test; on the command line, --bootstrap B).';

/**
 * Stage 1 of the stability block: the jackknife, the rolling window and the break test's
 * statistic; the break test's bootstrap, when asked for and possible, is returned as a plan.
 *
 * Method: jackknife (stability/jackknife.ts, the five estimators of the independent model),
 * rollingWindow (binomialMle with its profile interval at `level` on each window), and
 * supLrStatistic with the null model `nullModel` (binomialMle's (p, rho) on the whole panel),
 * timed under `stability.jackknife`, `stability.rolling` and `stability.breakTest`.
 *
 * Special cases (status and sentence, never numbers): fewer than 2 periods for the jackknife;
 * fewer periods than the window; fewer than 10 periods, no null model or a statistic whose fits
 * did not converge for the break test; without a bootstrap the break test is `statistic-only`.
 *
 * @example prepareStability(panel, { pd, rho }, 0.95, { rollingWindow: 10, breakTest: { replications: 200, seed: 7 } }, timer)
 *
 * Reference: Efron & Tibshirani (1993), ch. 11 (jackknife); Andrews (1993) (sup-LR); Davison &
 * Hinkley (1997), section 4.2 (bootstrap p-value).
 */
export function prepareStability(
  panel: LabelledPanel,
  nullModel: { pd: number; rho: number } | { reason: string },
  level: number,
  options: StabilityOptions,
  timer: StageTimer,
): { stability: Stability; breakTest: BreakTestPlan | null } {
  const T = panel.obligors.length;
  const jack: Stability['jackknife'] = timer.time('stability.jackknife', () =>
    T < 2
      ? { status: 'undefined', reason: 'Leaving one period out needs at least 2 periods; this panel has 1.' }
      : { status: 'ok', ...jackknife(panel) },
  );
  const rolling = timer.time('stability.rolling', () => rollingWindow(panel, { window: options.rollingWindow ?? 10, level }));
  let plan: BreakTestPlan | null = null;
  const breakTest = timer.time('stability.breakTest', (): BreakTestDto => {
    if (T < 2 * BREAK_MIN_SIDE) {
      return {
        status: 'undefined',
        reason: `The break test compares at least ${BREAK_MIN_SIDE} periods before and after each split, so it needs ${2 * BREAK_MIN_SIDE} periods; this panel has ${T}.`,
      };
    }
    if ('reason' in nullModel) return { status: 'undefined', reason: nullModel.reason };
    const observed = supLrStatistic(panel);
    if (!observed.converged) {
      return { status: 'undefined', reason: 'A likelihood fit behind the break statistic (the whole window or one of its parts) did not converge, so the statistic is not reported.' };
    }
    const asked = options.breakTest ?? null;
    if (asked) plan = { spec: { obligors: panel.obligors, pd: nullModel.pd, rho: nullModel.rho, seed: asked.seed }, replications: asked.replications, observed };
    return {
      status: 'statistic-only',
      statistic: observed.statistic,
      splitYear: String(panel.periods[observed.splitIndex]),
      pValue: null,
      replications: 0,
      failed: 0,
      seed: null,
      splits: observed.splits.map((s) => ({ splitYear: String(panel.periods[s.splitIndex]), statistic: s.statistic })),
      reason: NO_BREAK_P_VALUE,
    };
  });
  return { stability: { jackknife: jack, breakTest, rolling }, breakTest: plan };
}

/**
 * Stage 2: the break test with its bootstrap p-value (summariseBreakTest), and the
 * `structural-break` warning when it rejects at 5%.
 *
 * Special cases: when no replication gave a statistic the test is `undefined` with the sentence of
 * summariseBreakTest; replications that are not the indices 0..B-1 once each throw RangeError.
 *
 * @example completeBreakTest(panel, plan, breakTestRange(plan.spec, 0, plan.replications))
 */
export function completeBreakTest(
  panel: LabelledPanel,
  plan: BreakTestPlan,
  replications: readonly BreakReplication[],
): { breakTest: BreakTestDto; warning: FitWarning | null } {
  const r = summariseBreakTest(panel, plan.observed, replications);
  if (r.status === 'undefined') return { breakTest: r, warning: null };
  const breakTest: BreakTestDto = {
    status: 'ok',
    statistic: r.statistic,
    splitYear: r.splitYear,
    pValue: r.pValue,
    replications: r.replications,
    failed: r.failed,
    seed: plan.spec.seed,
    splits: r.splits,
  };
  const warning: FitWarning | null =
    r.pValue < BREAK_TEST_LEVEL
      ? {
          code: 'structural-break',
          message: `The break test finds a change in (p, rho) from ${r.splitYear} on (largest likelihood-ratio statistic ${r.statistic.toFixed(2)}, bootstrap p = ${r.pValue.toFixed(3)} over ${r.replications - r.failed} panels): the window mixes regimes, so one rho for all of it describes neither part. Fit the parts separately, or say why the whole window is the right one.`,
        }
      : null;
  return { breakTest, warning };
}
