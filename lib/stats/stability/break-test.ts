/**
 * A structural-break test for the correlation (DESIGN.md, `stability.breakTest`
 * `{ statistic, splitYear, pValue, replications }`): the supremum over split years of the
 * likelihood-ratio statistic of separate (p, rho) before and after the split, with a p-value from a
 * parametric bootstrap of that supremum under the fitted no-break model.
 *
 * Why a bootstrap: the supremum over candidate splits of LR statistics is not chi-square
 * distributed (the split is chosen to make it large); Andrews (1993) gives its asymptotic law, but
 * with 10-25 years the parametric bootstrap under the null model is the reliable reference.
 *
 * Reproducibility across threads: replication i draws from createRng(deriveSeed(seed, i)), so the
 * replications can be computed over any split of [0, B) (breakTestRange) and merged
 * (summariseBreakTest) with identical results.
 */
import { binomialMle } from '../estimators/binomial-mle';
import type { Panel } from '../panel';
import { createRng, deriveSeed } from '../random';
import { simulatePanel } from '../simulate';
import { assertSimulationModel, type SimulationModel } from '../simulation-spec';
import { assertLabelledPanel, type LabelledPanel } from './jackknife';

/** Fewest periods on each side of a split. */
export const BREAK_MIN_SIDE = 5;
/** Most replications one break test may ask for. */
export const MAX_BREAK_REPLICATIONS = 100_000;

/** The sup-LR statistic of a panel. */
export interface SupLr {
  /** max over splits of LR_s = 2 (l*(before) + l*(after) - l*(whole)). */
  statistic: number;
  /** Index (0-based) of the first period of the second part at the supremum. */
  splitIndex: number;
  /** LR_s for each candidate split s = 5 .. T - 5, in order. */
  splits: { splitIndex: number; statistic: number }[];
  /** Every binomialMle behind it met its tolerance. */
  converged: boolean;
}

/** One bootstrap replication: the sup-LR statistic of a panel simulated under the null. */
export interface BreakReplication {
  index: number;
  /** null when a fit did not converge (left out of the p-value, counted in `failed`). */
  statistic: number | null;
}

/** The break test (DESIGN.md `stability.breakTest`), with the count of failed replications. */
export interface BreakTest {
  status: 'ok';
  statistic: number;
  /** The first period of the second part, at the supremum. */
  splitYear: string;
  /** (1 + #{sup* >= sup}) / (1 + B'), B' the replications that gave a statistic. */
  pValue: number;
  replications: number;
  failed: number;
  /** LR_s per candidate split (the chart behind the sentence). */
  splits: { splitYear: string; statistic: number }[];
}

/** No break test for these data, with the reason. */
export interface BreakTestUndefined {
  status: 'undefined';
  reason: string;
}

/**
 * The supremum of the log-likelihood of binomialMle on a panel: its maximum, and 0 for a panel
 * whose periods have no defaults at all or only defaults (the likelihood tends to 1 as p tends to
 * 0 or 1, whatever rho).
 */
function supLogLik(panel: Panel): { value: number; converged: boolean } {
  const allNone = panel.defaults.every((d) => d === 0);
  const allDefault = panel.defaults.every((d, t) => d === panel.obligors[t]);
  if (allNone || allDefault) return { value: 0, converged: true };
  const fit = binomialMle(panel);
  if (fit.logLik === null) throw new RangeError('supLrStatistic: binomialMle gave no log-likelihood on a panel with defaults.');
  return { value: fit.logLik, converged: fit.status !== 'not-converged' };
}

/**
 * The sup-LR break statistic of a panel.
 *
 * For each split s = 5, ..., T - 5 (periods 1..s before, s+1..T after; at least 5 on each side),
 * LR_s = 2 (l*(1..s) + l*(s+1..T) - l*(1..T)), with l* the maximised binomial-mixture
 * log-likelihood (binomialMle, binomial coefficients included; the supremum 0 for a part without
 * any default). The statistic is max_s LR_s, at the first split that attains it.
 *
 * Method: 2 (T - 9) + 1 binomialMle fits. Rounding can make LR_s a hair below 0 when the parts
 * fit no better than the whole; values down to -1e-6 are set to 0.
 *
 * Special cases: fewer than 10 periods throws RangeError (no split has 5 periods on each side);
 * invalid counts throw RangeError naming the period.
 *
 * @example supLrStatistic({ obligors: new Array(12).fill(1000), defaults: [5, 8, 6, 9, 7, 6, 20, 25, 18, 22, 30, 21] })
 *
 * Reference: Andrews, D. W. K. (1993), "Tests for parameter instability and structural change with
 * unknown change point", Econometrica 61:821-856, eq. (4.3) (the sup-LR statistic); Gordy & Heitfield
 * (2002) for the likelihood.
 */
export function supLrStatistic(panel: Panel): SupLr {
  const T = panel.obligors.length;
  if (T < 2 * BREAK_MIN_SIDE) {
    throw new RangeError(`supLrStatistic: a split with ${BREAK_MIN_SIDE} periods on each side needs at least ${2 * BREAK_MIN_SIDE} periods; got ${T}.`);
  }
  const part = (from: number, to: number) => supLogLik({ obligors: panel.obligors.slice(from, to), defaults: panel.defaults.slice(from, to) });
  const whole = part(0, T);
  let converged = whole.converged;
  const splits: SupLr['splits'] = [];
  let best = -1;
  for (let s = BREAK_MIN_SIDE; s <= T - BREAK_MIN_SIDE; s++) {
    const a = part(0, s);
    const b = part(s, T);
    converged &&= a.converged && b.converged;
    let lr = 2 * (a.value + b.value - whole.value);
    if (lr < 0 && lr > -1e-6) lr = 0;
    splits.push({ splitIndex: s, statistic: lr });
    if (best < 0 || lr > splits[best].statistic) best = splits.length - 1;
  }
  return { statistic: splits[best].statistic, splitIndex: splits[best].splitIndex, splits, converged };
}

function assertRange(fn: string, from: number, to: number): void {
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`${fn}: the index range must satisfy 0 <= from <= to (whole numbers); got [${from}, ${to}).`);
  }
}

/**
 * Bootstrap replications i = from, ..., to - 1 of the sup-LR statistic under the no-break model.
 *
 * Replication i: rng = createRng(deriveSeed(seed, i)); a panel simulated at the fitted (pd, rho)
 * of the whole panel (and phi, if the spec names one) with the cohort sizes n_t; its
 * supLrStatistic, or null when a fit did not converge.
 *
 * Special cases: from = to gives []; fewer than 10 periods, a bad range or a bad model throw
 * RangeError.
 *
 * @example breakTestRange({ obligors: new Array(12).fill(1000), pd: 0.01, rho: 0.05, seed: 7 }, 0, 10)
 *
 * Reference: Davison, A. C. & Hinkley, D. V. (1997), Bootstrap Methods and their Application,
 * Cambridge University Press, section 4.2 (parametric bootstrap tests).
 *
 * @param onReplication called after each replication (for progress); must not throw.
 */
export function breakTestRange(
  spec: SimulationModel,
  from: number,
  to: number,
  onReplication?: (replication: BreakReplication) => void,
): BreakReplication[] {
  assertSimulationModel('breakTestRange', spec);
  assertRange('breakTestRange', from, to);
  if (spec.obligors.length < 2 * BREAK_MIN_SIDE) {
    throw new RangeError(`breakTestRange: the break test needs at least ${2 * BREAK_MIN_SIDE} periods; got ${spec.obligors.length}.`);
  }
  const obligors = spec.obligors.slice();
  const out: BreakReplication[] = [];
  for (let i = from; i < to; i++) {
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors, phi: spec.phi }, createRng(deriveSeed(spec.seed, i)));
    const sup = supLrStatistic(sim);
    const replication = { index: i, statistic: sup.converged ? sup.statistic : null };
    out.push(replication);
    onReplication?.(replication);
  }
  return out;
}

/** The null model of a panel's break test: binomialMle on the whole panel, or the reason there is none. */
export function breakTestNullModel(panel: Panel): { pd: number; rho: number } | BreakTestUndefined {
  const T = panel.obligors.length;
  if (T < 2 * BREAK_MIN_SIDE) {
    return {
      status: 'undefined',
      reason: `The break test compares at least ${BREAK_MIN_SIDE} periods before and after each split, so it needs ${2 * BREAK_MIN_SIDE} periods; this panel has ${T}.`,
    };
  }
  const fit = binomialMle(panel);
  if (fit.rho === null || fit.pd === null || fit.status === 'not-converged') {
    return { status: 'undefined', reason: fit.reason ?? 'The no-break model has no estimate, so there is nothing to simulate from.' };
  }
  return { pd: fit.pd, rho: fit.rho };
}

/**
 * Combines the observed statistic and the bootstrap replications into the test.
 *
 * p-value = (1 + #{i : sup*_i >= sup}) / (1 + B'), B' the replications with a statistic (the
 * Monte Carlo p-value of Davison & Hinkley 1997, eq. 4.11, which is exact in level for B' + 1
 * exchangeable statistics). splitYear is the label of the first period after the split at the
 * supremum.
 *
 * Special cases: the replications must be the indices 0..B-1 once each (RangeError otherwise);
 * when none gave a statistic the result is `undefined` with a sentence.
 *
 * @example summariseBreakTest(panel, supLrStatistic(panel), breakTestRange(spec, 0, 200))
 *
 * Reference: Davison & Hinkley (1997), section 4.2; Andrews (1993).
 */
export function summariseBreakTest(
  panel: LabelledPanel,
  observed: SupLr,
  replications: readonly BreakReplication[],
): BreakTest | BreakTestUndefined {
  assertLabelledPanel(panel, 'summariseBreakTest');
  const B = replications.length;
  if (B < 1 || B > MAX_BREAK_REPLICATIONS) {
    throw new RangeError(`summariseBreakTest: the number of replications must be from 1 to ${MAX_BREAK_REPLICATIONS}; got ${B}.`);
  }
  const seen = new Uint8Array(B);
  for (const r of replications) {
    if (!Number.isInteger(r.index) || r.index < 0 || r.index >= B || seen[r.index]) {
      throw new RangeError(`summariseBreakTest: replication index ${r.index} is missing, repeated or outside 0..${B - 1}; merge each slice exactly once.`);
    }
    seen[r.index] = 1;
  }
  let valid = 0;
  let exceed = 0;
  for (const r of replications) {
    if (r.statistic === null) continue;
    valid++;
    if (r.statistic >= observed.statistic) exceed++;
  }
  if (valid === 0) {
    return { status: 'undefined', reason: `None of the ${B} simulated panels gave a statistic (every fit failed to converge), so there is no p-value.` };
  }
  return {
    status: 'ok',
    statistic: observed.statistic,
    splitYear: String(panel.periods[observed.splitIndex]),
    pValue: (1 + exceed) / (1 + valid),
    replications: B,
    failed: B - valid,
    splits: observed.splits.map((s) => ({ splitYear: String(panel.periods[s.splitIndex]), statistic: s.statistic })),
  };
}

/**
 * The structural-break test in one call, in this thread: the null model (binomialMle on the whole
 * panel), supLrStatistic of the panel, breakTestRange over [0, B), summariseBreakTest.
 *
 * Special cases: fewer than 10 periods or a panel without an estimate give status `undefined`
 * with a sentence; a bad seed or B outside 1..100,000 throw RangeError.
 *
 * @example breakTest({ periods, obligors, defaults }, { replications: 200, seed: 7 })
 *
 * Reference: Andrews (1993); Davison & Hinkley (1997), section 4.2.
 */
export function breakTest(panel: LabelledPanel, options: { replications: number; seed: number }): BreakTest | BreakTestUndefined {
  assertLabelledPanel(panel, 'breakTest');
  const { replications, seed } = options;
  if (!Number.isInteger(replications) || replications < 1 || replications > MAX_BREAK_REPLICATIONS) {
    throw new RangeError(`breakTest: the number of replications must be a whole number from 1 to ${MAX_BREAK_REPLICATIONS}; got ${replications}.`);
  }
  const model = breakTestNullModel(panel);
  if ('status' in model) return model;
  const observed = supLrStatistic(panel);
  const spec: SimulationModel = { obligors: panel.obligors, pd: model.pd, rho: model.rho, seed };
  return summariseBreakTest(panel, observed, breakTestRange(spec, 0, replications));
}
