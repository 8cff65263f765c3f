/**
 * The fit of a group of rating grades under one systematic factor (Gordy & Heitfield 2002): the
 * `group` block of the engine's JSON. Common rho with grade PDs (maximum likelihood, profile
 * interval of rho, profile intervals of the PDs), grade-specific rho under the same factor, the
 * likelihood-ratio test of one common rho, the monotonicity of the PDs across the grades in the
 * order given, and each grade's own single-segment binomialMle beside it.
 */
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { binomialMle } from './estimators/binomial-mle';
import type { EstimateStatus } from './estimators/types';
import { fitGradeSpecificRho } from './grade-specific-rho';
import { CommonRhoGradeModel } from './grade-model';

/** One grade's panel (a segment of the dataset, or a grade within one). */
export interface GradeInput {
  segment: string;
  periods: readonly string[];
  obligors: readonly number[];
  defaults: readonly number[];
}

/** Options of {@link fitGrades}. */
export interface GradeFitOptions {
  /** Level of the intervals (default 0.95). */
  level?: number;
  /** Fit the years every grade has instead of refusing grades with different windows (default false). */
  commonWindow?: boolean;
  /** Compute the grade PD profile intervals (default true; each costs a profile search). */
  pdIntervals?: boolean;
}

/** A break of the order of the PDs: `to` follows `from` in the order given but has a lower PD. */
export interface MonotonicityBreak {
  from: string;
  to: string;
  pdFrom: number;
  pdTo: number;
}

/** The `group` block. Numbers are null when `status` is not `ok` (then `reason` says why). */
export interface GradeFit {
  status: EstimateStatus;
  reason?: string;
  segments: string[];
  periods: string[];
  level: number;
  commonRho: { rho: number; logLik: number; atBoundary: boolean; interval: { level: number; lower: number; upper: number; upperAtSearchLimit: boolean } } | null;
  pds: Record<string, { pd: number; lower: number | null; upper: number | null }> | null;
  gradeRho: Record<string, number> | null;
  gradeSpecific: { logLik: number; pds: Record<string, number>; converged: boolean } | null;
  lrTest: { statistic: number; df: number; pValue: number } | null;
  /** PDs in the order given (best grade first): do they increase? */
  monotonicity: { increasing: boolean; breaks: MonotonicityBreak[] } | null;
  /** Each grade's own binomialMle on the same years, for comparison. */
  single: Record<string, { rho: number | null; pd: number | null; status: EstimateStatus }>;
  warnings: { code: string; message: string }[];
}

/** Most grades in one group (the Hessian has (G + 1)^2 entries, the alternative model 4 G^2). */
export const MAX_GRADES = 20;

function refused(inputs: readonly GradeInput[], level: number, reason: string, periods: string[] = []): GradeFit {
  return {
    status: 'undefined',
    reason,
    segments: inputs.map((i) => i.segment),
    periods,
    level,
    commonRho: null,
    pds: null,
    gradeRho: null,
    gradeSpecific: null,
    lrTest: null,
    monotonicity: null,
    single: {},
    warnings: [],
  };
}

function listYears(years: string[]): string {
  return years.length <= 6 ? years.join(', ') : `${years.slice(0, 5).join(', ')} and ${years.length - 5} more`;
}

/**
 * Checks the PDs in the order given, which the user states as best grade first: each grade's PD
 * should be at or above the one before it. Lists every adjacent pair where the order breaks.
 *
 * @example pdMonotonicity(['A', 'B', 'C'], [0.001, 0.004, 0.003]) // { increasing: false, breaks: [{ from: 'B', to: 'C', ... }] }
 */
export function pdMonotonicity(segments: readonly string[], pds: readonly number[]): { increasing: boolean; breaks: MonotonicityBreak[] } {
  const breaks: MonotonicityBreak[] = [];
  for (let g = 1; g < pds.length; g++) {
    if (pds[g] < pds[g - 1]) breaks.push({ from: segments[g - 1], to: segments[g], pdFrom: pds[g - 1], pdTo: pds[g] });
  }
  return { increasing: breaks.length === 0, breaks };
}

/**
 * Fits a group of grades under one factor (module comment). Grades are the inputs in the order
 * given (best first, for the monotonicity check).
 *
 * Method: CommonRhoGradeModel (grade-model.ts) for the common rho, its profile interval and the
 * PD profile intervals; fitGradeSpecificRho (grade-specific-rho.ts) for rho_g; the LR statistic
 * 2 (l_specific - l_common) against chi-square with G - 1 degrees of freedom (asymptotic; when
 * some rho_g sit at 0 the reference law is a mixture and the chi-square p-value is conservative,
 * Self & Liang 1987).
 *
 * Special cases (status `undefined` with a sentence, never NaN): fewer than 2 grades or more than
 * MAX_GRADES; grades with different years (the sentence names each grade's missing years; with
 * `commonWindow` the years all grades have are used instead, at least 3); a grade without
 * defaults or with only defaults in the window (its PD has no interior maximum). A likelihood
 * that cannot be evaluated gives status `not-converged` with the reason.
 *
 * @example fitGrades([{ segment: 'A', periods, obligors, defaults }, { segment: 'B', ... }], { level: 0.95 })
 *
 * Reference: Gordy & Heitfield (2002), section 3; Self, S. G. & Liang, K.-Y. (1987), JASA
 * 82:605-610; Wilks, S. S. (1938), Annals of Mathematical Statistics 9:60-62.
 */
export function fitGrades(inputs: readonly GradeInput[], options: GradeFitOptions = {}): GradeFit {
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1)) throw new RangeError(`fitGrades: the level must be strictly between 0 and 1; got ${level}.`);
  if (inputs.length < 2) return refused(inputs, level, 'A grade model needs at least two grades; give two or more segments.');
  if (inputs.length > MAX_GRADES) return refused(inputs, level, `A grade model takes at most ${MAX_GRADES} grades; got ${inputs.length}.`);
  const names = new Set<string>();
  for (const i of inputs) {
    if (names.has(i.segment)) return refused(inputs, level, `Grade "${i.segment}" is given twice; give each grade once.`);
    names.add(i.segment);
  }
  // Years: the same for every grade, or the common window when asked for.
  const all = [...new Set(inputs.flatMap((i) => i.periods.map(String)))].sort();
  const missing = inputs.map((i) => ({ segment: i.segment, years: all.filter((y) => !i.periods.map(String).includes(y)) }));
  let periods = all;
  if (missing.some((m) => m.years.length > 0)) {
    periods = all.filter((y) => missing.every((m) => !m.years.includes(y)));
    if (!options.commonWindow) {
      const detail = missing.filter((m) => m.years.length > 0).map((m) => `${m.segment} has no data for ${listYears(m.years)}`).join('; ');
      return refused(
        inputs,
        level,
        `The grades cover different years (${detail}). Fit the common window${periods.length > 0 ? ` (${periods.length} years, ${periods[0]}-${periods.at(-1)})` : ''} instead, or give every grade the same years.`,
      );
    }
    if (periods.length < 3) return refused(inputs, level, `The grades have only ${periods.length} year${periods.length === 1 ? '' : 's'} in common; a grade model needs at least 3.`);
  }
  const panels = inputs.map((i) => {
    const at = new Map(i.periods.map((p, t) => [String(p), t]));
    return { obligors: periods.map((y) => i.obligors[at.get(y)!]), defaults: periods.map((y) => i.defaults[at.get(y)!]) };
  });
  const single: GradeFit['single'] = {};
  inputs.forEach((i, g) => {
    const m = binomialMle(panels[g]);
    single[i.segment] = { rho: m.rho, pd: m.pd, status: m.status };
  });
  for (let g = 0; g < inputs.length; g++) {
    const d = panels[g].defaults.reduce((s, v) => s + v, 0);
    const n = panels[g].obligors.reduce((s, v) => s + v, 0);
    if (d === 0 || d === n) {
      return {
        ...refused(
          inputs,
          level,
          `Grade "${inputs[g].segment}" has ${d === 0 ? 'no defaults' : 'only defaults'} in ${periods[0]}-${periods.at(-1)}, so its PD has no maximum inside (0, 1); leave it out of the group (the most prudent PD bounds a grade without defaults).`,
          periods,
        ),
        single,
      };
    }
  }
  const segments = inputs.map((i) => i.segment);
  try {
    const model = new CommonRhoGradeModel(panels);
    const common = model.maximise();
    const interval = model.rhoInterval(common, level);
    const pdIntervals = options.pdIntervals ?? true;
    const pds: NonNullable<GradeFit['pds']> = {};
    let pdConverged = true;
    segments.forEach((s, g) => {
      if (pdIntervals) {
        const iv = model.pdInterval(common, g, level);
        pdConverged &&= iv.converged;
        pds[s] = { pd: common.pds[g], lower: iv.lower, upper: iv.upper };
      } else {
        pds[s] = { pd: common.pds[g], lower: null, upper: null };
      }
    });
    const specific = fitGradeSpecificRho(model.likelihood, common);
    const statistic = Math.max(0, 2 * (specific.logLik - common.logLik));
    const df = segments.length - 1;
    const warnings: GradeFit['warnings'] = [];
    const monotonicity = pdMonotonicity(segments, common.pds);
    if (!monotonicity.increasing) {
      warnings.push({
        code: 'grade-order',
        message: `The fitted PDs do not increase across the grades in the order given: ${monotonicity.breaks.map((b) => `${b.to} (${(100 * b.pdTo).toFixed(3)}%) is below ${b.from} (${(100 * b.pdFrom).toFixed(3)}%)`).join('; ')}. Check the grade order or the rating scale.`,
      });
    }
    const report = model.likelihood.report();
    if (report.unconverged > 0) {
      warnings.push({
        code: 'integration-tolerance',
        message: `${report.unconverged} of the year integrals behind the group likelihood stopped above their error tolerance of 1e-8 (largest error estimate ${report.worstRelativeError.toExponential(1)}); the values were used.`,
      });
    }
    if (!specific.converged) {
      warnings.push({ code: 'grade-specific-not-converged', message: 'The grade-specific model did not meet its tolerance; its rho values and the LR test are indicative only.' });
    }
    if (common.atSearchLimit) warnings.push({ code: 'grade-rho-limit', message: 'The common rho reached the search limit 0.995.' });
    const converged = common.converged && interval.converged && pdConverged;
    return {
      status: converged ? (common.atSearchLimit ? 'clipped' : 'ok') : 'not-converged',
      ...(converged ? {} : { reason: 'The maximisation or an interval search of the grade model did not meet its tolerance; do not use these values.' }),
      segments,
      periods,
      level,
      commonRho: {
        rho: common.rho,
        logLik: common.logLik,
        atBoundary: common.atBoundary,
        interval: { level, lower: interval.lower, upper: interval.upper, upperAtSearchLimit: interval.upperAtSearchLimit },
      },
      pds,
      gradeRho: Object.fromEntries(segments.map((s, g) => [s, specific.rhos[g]])),
      gradeSpecific: { logLik: specific.logLik, pds: Object.fromEntries(segments.map((s, g) => [s, specific.pds[g]])), converged: specific.converged },
      lrTest: { statistic, df, pValue: statistic === 0 ? 1 : 1 - chisquareCdf(statistic, df) },
      monotonicity,
      single,
      warnings,
    };
  } catch (err) {
    if (!(err instanceof RangeError)) throw err;
    return { ...refused(inputs, level, `The group likelihood could not be evaluated: ${err.message}`, periods), status: 'not-converged', single };
  }
}
