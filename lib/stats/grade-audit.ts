/**
 * The estimator audit of the grade model: how the common-rho estimate and its profile interval
 * behave at the user's own cohort sizes n_gt and years T. R groups are simulated at the fitted
 * grade PDs and common rho with one shared factor per year, the common-rho model is fitted to each,
 * and the audit reports the bias, sd and RMSE of rho-hat and the coverage of the profile interval.
 *
 * Replication r draws from createRng(deriveSeed(seed, r)), so replications can be computed over
 * any split of [0, R) (gradeAuditRange) on worker threads and merged (mergeGradeAudit) with
 * identical results.
 *
 * Reference: Morris, T. P., White, I. R. & Crowther, M. J. (2019), "Using simulation studies to
 * evaluate statistical methods", Statistics in Medicine 38:2074-2102 (table 6); Gordy & Heitfield
 * (2002), section 3 (the model simulated).
 */
import { CommonRhoGradeModel } from './grade-model';
import { createRng, deriveSeed } from './random';
import { conditionalPd } from './vasicek';

/** What the grade audit simulates. */
export interface GradeAuditSpec {
  /** obligors[g][t]: the cohort sizes of each grade and year. */
  obligors: number[][];
  /** Fitted grade PDs and common rho: the truth of the simulation. */
  pds: number[];
  rho: number;
  seed: number;
  level?: number;
}

/** One replication: the estimate and interval, or null when the fit gave none. */
export interface GradeAuditReplication {
  index: number;
  rho: number | null;
  lower: number | null;
  upper: number | null;
}

/** Summary of a grade audit. */
export interface GradeAuditSummary {
  truth: { rho: number; pds: number[] };
  replications: number;
  seed: number;
  /** Replications with an estimate. */
  defined: number;
  bias: number | null;
  sd: number | null;
  rmse: number | null;
  /** Share of all replications whose interval holds the truth (no interval counts as a miss). */
  coverage: number | null;
  coverageMcse: number | null;
  level: number;
}

function assertSpec(spec: GradeAuditSpec): void {
  if (!Array.isArray(spec.obligors) || spec.obligors.length !== spec.pds.length || spec.pds.length < 1) {
    throw new RangeError('gradeAudit: give one row of cohort sizes per grade PD.');
  }
  spec.pds.forEach((p, g) => {
    if (!(p > 0 && p < 1)) throw new RangeError(`gradeAudit: the PD of grade ${g + 1} must be strictly between 0 and 1; got ${p}.`);
  });
  if (!(spec.rho >= 0 && spec.rho < 1)) throw new RangeError(`gradeAudit: rho must be in [0, 1); got ${spec.rho}.`);
  if (!Number.isInteger(spec.seed) || spec.seed < 0 || spec.seed > 0xffffffff) throw new RangeError(`gradeAudit: the seed must be a whole number from 0 to 4294967295; got ${spec.seed}.`);
}

/**
 * Replications from .. to - 1 of the grade audit: for each, one standard normal factor per year
 * (rng.normal, in year order) and, given it, each grade's defaults Binomial(n_gt, P_g(x_t)) (in
 * grade order); then the common-rho maximum and its profile interval at `level`. A group where a
 * grade drew no defaults (its PD has no interior maximum) counts as undefined.
 *
 * @example gradeAuditRange({ obligors: [[1000, 1000], [500, 500]], pds: [0.01, 0.03], rho: 0.1, seed: 3 }, 0, 10)
 */
export function gradeAuditRange(spec: GradeAuditSpec, from: number, to: number, onReplication?: () => void): GradeAuditReplication[] {
  assertSpec(spec);
  if (!Number.isSafeInteger(from) || !Number.isSafeInteger(to) || from < 0 || to < from) {
    throw new RangeError(`gradeAuditRange: the index range must satisfy 0 <= from <= to; got [${from}, ${to}).`);
  }
  const level = spec.level ?? 0.95;
  const G = spec.pds.length;
  const T = spec.obligors[0].length;
  const out: GradeAuditReplication[] = [];
  for (let r = from; r < to; r++) {
    const rng = createRng(deriveSeed(spec.seed, r));
    const defaults = spec.pds.map(() => new Array<number>(T));
    for (let t = 0; t < T; t++) {
      const x = rng.normal();
      for (let g = 0; g < G; g++) defaults[g][t] = rng.binomial(spec.obligors[g][t], conditionalPd(spec.pds[g], spec.rho, x));
    }
    let rep: GradeAuditReplication = { index: r, rho: null, lower: null, upper: null };
    try {
      const model = new CommonRhoGradeModel(spec.obligors.map((n, g) => ({ obligors: n, defaults: defaults[g] })));
      const fit = model.maximise();
      if (fit.converged) {
        const iv = model.rhoInterval(fit, level);
        rep = { index: r, rho: fit.rho, lower: iv.lower, upper: iv.upper };
      }
    } catch (err) {
      if (!(err instanceof RangeError)) throw err;
    }
    out.push(rep);
    onReplication?.();
  }
  return out;
}

/**
 * Merges grade-audit slices (any order, each index of [0, R) once) and summarises them: bias,
 * sd (divisor m - 1) and RMSE of rho-hat over the m replications with an estimate; coverage of the
 * profile interval over all R, with its Monte Carlo standard error sqrt(c (1 - c) / R).
 *
 * Special cases: an index missing or repeated throws RangeError; fewer than 2 estimates give null
 * statistics.
 *
 * Reference: Morris, White & Crowther (2019), table 6.
 */
export function mergeGradeAudit(parts: readonly (readonly GradeAuditReplication[])[], spec: GradeAuditSpec): GradeAuditSummary {
  assertSpec(spec);
  const all = parts.flat().slice().sort((a, b) => a.index - b.index);
  all.forEach((r, i) => {
    if (r.index !== i) throw new RangeError(`mergeGradeAudit: replication index ${i} is missing or repeated (found ${r.index}).`);
  });
  const R = all.length;
  const xs = all.filter((r) => r.rho !== null).map((r) => r.rho!);
  const m = xs.length;
  const mean = m > 0 ? xs.reduce((s, v) => s + v, 0) / m : 0;
  const covered = all.filter((r) => r.lower !== null && r.lower <= spec.rho && spec.rho <= r.upper!).length;
  const c = R > 0 ? covered / R : null;
  return {
    truth: { rho: spec.rho, pds: spec.pds.slice() },
    replications: R,
    seed: spec.seed,
    defined: m,
    bias: m >= 2 ? mean - spec.rho : null,
    sd: m >= 2 ? Math.sqrt(xs.reduce((s, v) => s + (v - mean) ** 2, 0) / (m - 1)) : null,
    rmse: m >= 2 ? Math.sqrt(xs.reduce((s, v) => s + (v - spec.rho) ** 2, 0) / m) : null,
    coverage: c,
    coverageMcse: c === null ? null : Math.sqrt((c * (1 - c)) / R),
    level: spec.level ?? 0.95,
  };
}
