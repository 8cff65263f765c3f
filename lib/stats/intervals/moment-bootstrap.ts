/**
 * Parametric bootstrap of the moment estimators (momentVariance, momentVarianceCorrected,
 * jointDefault, and momentVarianceAutocorrected beside them): their interval (DESIGN.md, "Interval keys and bootstraps": the moment estimators'
 * `intervals.bootstrap` `{ level, lower, upper, bias, replications, clipped, undefined }`).
 *
 * B panels are simulated at the estimator's own (p, rho) with the observed cohort sizes n_t, the
 * same estimator is re-run on each, and the percentile interval and the bias come from the B
 * estimates (Efron & Tibshirani 1993, ch. 6 and 13), with DESIGN.md's rules for replicates
 * without a value: a moment target at or below 0 counts as rho = 0 and in `clipped`; an estimator
 * without a value (no default at all, a target beyond what any rho gives) counts in `undefined`
 * and is left out of the percentiles and the bias.
 *
 * Reproducibility across threads: replication i draws from createRng(deriveSeed(seed, i)), so the
 * replications can be computed over any split of [0, B) (momentBootstrapRange over [from, to))
 * and merged with identical results, as the binomialMle bootstrap (intervals/bootstrap.ts).
 */
import { jointDefault } from '../estimators/joint-default';
import { momentTarget, MOMENT_ESTIMATOR_KEYS, type MomentEstimatorKey } from '../estimators/moment-target';
import { momentVariance } from '../estimators/moment-variance';
import { momentVarianceAutocorrected } from '../estimators/moment-variance-autocorrected';
import { momentVarianceCorrected } from '../estimators/moment-variance-corrected';
import type { Estimate } from '../estimators/types';
import type { Panel } from '../panel';
import { createRng, deriveSeed } from '../random';
import { simulatePanel } from '../simulate';
import { assertSimulationModel, type SimulationModel } from '../simulation-spec';
import { MAX_BOOTSTRAP_REPLICATIONS, sortedQuantile } from './bootstrap';

const ESTIMATOR: Record<MomentEstimatorKey, (panel: Panel) => Estimate> = {
  momentVariance,
  momentVarianceCorrected,
  jointDefault,
  momentVarianceAutocorrected,
};

/** What a moment bootstrap simulates: the estimator, its own (p, rho), the cohort sizes, the seed. */
export interface MomentBootstrapSpec extends SimulationModel {
  estimator: MomentEstimatorKey;
}

/** One replication: a value, a clip at rho = 0 (target at or below 0), or no value. */
export interface MomentBootstrapReplication {
  /** Replication index i in [0, B); its stream is createRng(deriveSeed(seed, i)). */
  index: number;
  /** The estimate (0 when clipped); null when undefined. */
  rho: number | null;
  outcome: 'value' | 'clipped' | 'undefined';
  /** Why the estimator gave no value (outcome `undefined`). */
  reason?: string;
}

/** The bootstrap interval of a moment estimator (DESIGN.md's `intervals.bootstrap`). */
export interface MomentBootstrapInterval {
  level: number;
  /** Percentile interval over the replicates with a value (clipped ones at 0 included). */
  lower: number;
  upper: number;
  /** mean(rho*) - rho_hat over the same replicates. */
  bias: number;
  /** B, the replications asked for. */
  replications: number;
  /** Replicates whose moment target was at or below 0 (counted as rho = 0). */
  clipped: number;
  /** Replicates where the estimator had no value (left out). */
  undefined: number;
}

/** Too few replicates had a value for an interval. */
export interface MomentBootstrapUndefined {
  status: 'undefined';
  reason: string;
  replications: number;
  clipped: number;
  undefined: number;
}

export type MomentBootstrapResult = ({ status: 'ok' } & MomentBootstrapInterval) | MomentBootstrapUndefined;

function assertSpec(fn: string, spec: MomentBootstrapSpec): void {
  if (!(MOMENT_ESTIMATOR_KEYS as readonly string[]).includes(spec.estimator)) {
    throw new RangeError(`${fn}: the estimator must be one of ${MOMENT_ESTIMATOR_KEYS.join(', ')}; got ${String(spec.estimator)}.`);
  }
  assertSimulationModel(fn, spec);
}

function assertReplications(fn: string, replications: number): void {
  if (!Number.isInteger(replications) || replications < 1 || replications > MAX_BOOTSTRAP_REPLICATIONS) {
    throw new RangeError(
      `${fn}: the number of replications must be a whole number from 1 to ${MAX_BOOTSTRAP_REPLICATIONS}; got ${replications}.`,
    );
  }
}

/**
 * The estimator on one panel, classified by DESIGN.md's rule.
 *
 * Target at or below 0 (momentTarget): `clipped`, rho = 0. Otherwise the estimator's value
 * (`value`), or `undefined` with its reason when it has none (or did not converge).
 *
 * @example classifyMomentEstimate('jointDefault', { obligors: [100, 100], defaults: [1, 1] }) // clipped
 */
export function classifyMomentEstimate(
  estimator: MomentEstimatorKey,
  panel: Panel,
): Pick<MomentBootstrapReplication, 'rho' | 'outcome' | 'reason'> {
  const m = momentTarget(estimator, panel);
  if (m.kind === 'undefined') return { rho: null, outcome: 'undefined', reason: m.reason };
  if (!(m.target > 0)) return { rho: 0, outcome: 'clipped' };
  const e = ESTIMATOR[estimator](panel);
  if (e.rho === null || e.status === 'undefined' || e.status === 'not-converged') {
    return { rho: null, outcome: 'undefined', reason: e.reason ?? 'The estimator gave no value.' };
  }
  return { rho: e.rho, outcome: 'value' };
}

/**
 * Computes moment-bootstrap replications i = from, ..., to - 1 (a slice of [0, B)).
 *
 * Replication i: rng = createRng(deriveSeed(seed, i)); d*_t from simulatePanel at (pd, rho) with
 * the cohort sizes n_t; the estimator on (n_t, d*_t), classified by classifyMomentEstimate.
 *
 * Special cases: from = to gives []; a range that is not 0 <= from <= to (whole numbers), an unknown
 * estimator, a PD outside (0, 1), rho outside [0, 1) or a bad seed throw RangeError.
 *
 * @example momentBootstrapRange({ estimator: 'jointDefault', obligors: [1000, 1000], pd: 0.01, rho: 0.1, seed: 7 }, 0, 2)
 *
 * Reference: Efron, B. & Tibshirani, R. J. (1993), An Introduction to the Bootstrap, section 6.5.
 *
 * @param onReplication called after each replication (for progress); must not throw.
 */
export function momentBootstrapRange(
  spec: MomentBootstrapSpec,
  from: number,
  to: number,
  onReplication?: (replication: MomentBootstrapReplication) => void,
): MomentBootstrapReplication[] {
  assertSpec('momentBootstrapRange', spec);
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`momentBootstrapRange: the index range must satisfy 0 <= from <= to (whole numbers); got [${from}, ${to}).`);
  }
  const obligors = spec.obligors.slice();
  const out: MomentBootstrapReplication[] = [];
  for (let i = from; i < to; i++) {
    const sim = simulatePanel({ pd: spec.pd, rho: spec.rho, obligors, phi: spec.phi }, createRng(deriveSeed(spec.seed, i)));
    const replication: MomentBootstrapReplication = { index: i, ...classifyMomentEstimate(spec.estimator, sim) };
    out.push(replication);
    onReplication?.(replication);
  }
  return out;
}

/**
 * Combines moment-bootstrap replications into DESIGN.md's `intervals.bootstrap`.
 *
 * Over the m replicates with a value (clipped ones at rho = 0 included), sorted:
 * lower = Q((1 - level) / 2), upper = Q((1 + level) / 2) (sortedQuantile, Hyndman & Fan
 * definition 7), bias = mean(rho*) - rho_hat; `clipped` and `undefined` count the replicates of
 * each kind.
 *
 * Method: the replications may come in any order and split; they must be the indices 0..B-1 once
 * each.
 *
 * Special cases: fewer than 2 replicates with a value give status `undefined` with a sentence and
 * the counts; missing or repeated indices, or `level` outside (0, 1), throw RangeError.
 *
 * @example summariseMomentBootstrap(momentBootstrapRange(spec, 0, 1000), spec, 0.95)
 *
 * Reference: Efron & Tibshirani (1993), ch. 13 (percentile interval) and section 10.2 (bias).
 */
export function summariseMomentBootstrap(
  replications: readonly MomentBootstrapReplication[],
  spec: MomentBootstrapSpec,
  level = 0.95,
): MomentBootstrapResult {
  if (!(level > 0 && level < 1)) {
    throw new RangeError(`summariseMomentBootstrap: the level must be strictly between 0 and 1; got ${level}.`);
  }
  const B = replications.length;
  assertReplications('summariseMomentBootstrap', B);
  const seen = new Uint8Array(B);
  for (const r of replications) {
    if (!Number.isInteger(r.index) || r.index < 0 || r.index >= B || seen[r.index]) {
      throw new RangeError(
        `summariseMomentBootstrap: replication index ${r.index} is missing, repeated or outside 0..${B - 1}; merge each slice of the range exactly once.`,
      );
    }
    seen[r.index] = 1;
  }
  const ordered = [...replications].sort((a, b) => a.index - b.index);
  const values: number[] = [];
  let clipped = 0;
  let undefinedCount = 0;
  for (const r of ordered) {
    if (r.outcome === 'undefined' || r.rho === null) undefinedCount++;
    else {
      if (r.outcome === 'clipped') clipped++;
      values.push(r.rho);
    }
  }
  if (values.length < 2) {
    return {
      status: 'undefined',
      reason: `Only ${values.length} of ${B} simulated panels gave ${spec.estimator} a value, so there is no bootstrap interval; the data are too sparse for this estimator.`,
      replications: B,
      clipped,
      undefined: undefinedCount,
    };
  }
  let sum = 0;
  for (const v of values) sum += v;
  const bias = sum / values.length - spec.rho;
  values.sort((a, b) => a - b);
  return {
    status: 'ok',
    level,
    lower: sortedQuantile(values, (1 - level) / 2),
    upper: sortedQuantile(values, (1 + level) / 2),
    bias,
    replications: B,
    clipped,
    undefined: undefinedCount,
  };
}

/**
 * Parametric bootstrap interval and bias of a moment estimator, in this thread: momentBootstrapRange
 * over [0, B) followed by summariseMomentBootstrap.
 *
 * @example momentBootstrap({ estimator: 'momentVariance', obligors: [1000, 1050, 1100], pd: 0.015, rho: 0.08, seed: 7 }, 1000)
 *
 * Reference: Efron & Tibshirani (1993), sections 6.5 and 13.3.
 */
export function momentBootstrap(spec: MomentBootstrapSpec, replications: number, level = 0.95): MomentBootstrapResult {
  assertReplications('momentBootstrap', replications);
  return summariseMomentBootstrap(momentBootstrapRange(spec, 0, replications), spec, level);
}
