/**
 * The challenge of the Gaussian copula as the segment review and the fit report read it: the fitted
 * laws from a stored segment (estimates.tCopula, betaMixing, logitNormal beside binomialMle), the
 * points of the tail chart, and the sentences of the test, its power and the identification of nu.
 * Pure (no React), so that the review and the printed report say the same thing.
 *
 * The bootstrap p-value of the test leads; the asymptotic one (the 50:50 mixture of chi-square(0)
 * and chi-square(1), Self & Liang 1987) is far from nominal with a few dozen years and is only ever
 * given after it, labelled as such.
 */
import { fixed, pct, pd, pValue, rho } from '@/lib/format';
import { lawRateQuantile, MIXING_LAW_LABELS, type MixingLaw } from '@/lib/stats/copula-comparison';
import type { FittedLaw } from '@/lib/stats/fitted-law';
import { COPULA_TEST_LEVEL } from '@/lib/stats/copula-lr-test';
import { LOW_POWER, type ModelComparison } from '@/lib/stats/mixing-laws-block';
import type { FitSegmentResult } from './results';

export { MIXING_LAW_LABELS };

type Segment = Pick<FitSegmentResult, 'estimates' | 'modelComparison' | 'observed' | 'T'>;
type OpenEnds = { lower: number | null; upper: number | null } | null | undefined;

/** An interval whose ends may be unbounded (null): "[0.0120, unbounded]"; a dash without one. */
export function openInterval(iv: OpenEnds, write: (x: number) => string = rho): string {
  if (!iv) return '—';
  const end = (x: number | null) => (x === null || !Number.isFinite(x) ? 'unbounded' : write(x));
  return `[${end(iv.lower)}, ${end(iv.upper)}]`;
}

/** A correlation that is zero but for rounding (|x| below half the last decimal) written as 0.0000, never "−0.0000". */
export function smallRho(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return rho(Math.abs(x) < 5e-5 ? 0 : x);
}

/** The t copula's degrees of freedom: "6.21", or "∞ (Gaussian limit)" when the maximum is there. */
export function nuText(nu: number | null | undefined, status?: string): string {
  if (nu === null || nu === undefined) return status === 'ok' || status === 'clipped' ? '∞ (Gaussian limit)' : '—';
  return fixed(nu, 2);
}

/** The fitted values of each law of the comparison, read back from the stored estimates. */
export function fittedLawsOf(seg: Segment): FittedLaw[] {
  const mc = seg.modelComparison;
  if (!mc) return [];
  const out: FittedLaw[] = [];
  for (const row of mc.laws) {
    const e = seg.estimates;
    if (row.law === 'gaussian' && e.binomialMle.pd !== null && e.binomialMle.rho !== null) {
      out.push({ law: 'gaussian', logLik: row.logLik, pd: e.binomialMle.pd, rho: e.binomialMle.rho });
    } else if (row.law === 't' && e.tCopula?.pd != null && e.tCopula.rho !== null) {
      out.push({ law: 't', logLik: row.logLik, pd: e.tCopula.pd, rho: e.tCopula.rho, nu: e.tCopula.nu ?? Number.POSITIVE_INFINITY });
    } else if (row.law === 'beta' && e.betaMixing?.pd != null && e.betaMixing.equivalentRho !== null) {
      out.push({ law: 'beta', logLik: row.logLik, pd: e.betaMixing.pd, equivalentRho: e.betaMixing.equivalentRho });
    } else if (row.law === 'logitNormal' && e.logitNormal?.mu != null && e.logitNormal.sigma !== null) {
      out.push({ law: 'logitNormal', logLik: row.logLik, mu: e.logitNormal.mu, sigma: e.logitNormal.sigma });
    }
  }
  return out;
}

/** Exceedance probabilities of the tail chart: log-spaced from 98% (where the best year of a long history sits) down to 1 in 10,000. */
export const TAIL_RANGE = { from: 0.98, to: 1e-4 } as const;

/** One law's tail curve: the default rate x exceeded with probability `exceed`, or why there is none. */
export type TailCurve = { law: MixingLaw; points: { exceed: number; rate: number }[] } | { law: MixingLaw; points: null; reason: string };

/**
 * Each law's tail curve P(pi > x) on `points` log-spaced exceedance probabilities (the default-rate
 * quantile at 1 - exceed, lawRateQuantile). A law whose quantile cannot be computed keeps its
 * sentence instead of points.
 */
export function tailCurves(laws: readonly FittedLaw[], points = 33): TailCurve[] {
  const lf = Math.log10(TAIL_RANGE.from);
  const lt = Math.log10(TAIL_RANGE.to);
  const grid = Array.from({ length: points }, (_, i) => 10 ** (lf + ((lt - lf) * i) / (points - 1)));
  return laws.map((law) => {
    try {
      return { law: law.law, points: grid.map((exceed) => ({ exceed, rate: lawRateQuantile(law, 1 - exceed) })) };
    } catch (err) {
      return { law: law.law, points: null, reason: err instanceof Error ? err.message : String(err) };
    }
  });
}

/**
 * The observed default rates at their plotting positions: the i-th largest of T rates drawn at the
 * exceedance probability i / (T + 1) (Weibull's plotting position, Gumbel 1958).
 */
export function observedExceedance(rates: readonly number[]): { rate: number; exceed: number }[] {
  const sorted = [...rates].sort((a, b) => b - a);
  return sorted.map((rate, i) => ({ rate, exceed: (i + 1) / (sorted.length + 1) }));
}

/**
 * The likelihood-ratio test of the Gaussian copula against the t copula in sentences: the statistic
 * and the bootstrap p-value first, what it says at 5%, then the asymptotic p-value labelled as such.
 */
export function lrTestSentences(mc: Pick<ModelComparison, 'lrTestGaussianVsT'>, tStatus?: { status: string; reason?: string } | null): string[] {
  const test = mc.lrTestGaussianVsT;
  if (!test) {
    const why = tStatus && tStatus.status !== 'ok' ? ` (the t copula is ${tStatus.status}${tStatus.reason ? `: ${tStatus.reason}` : ''})` : '';
    return [`The likelihood-ratio test of the Gaussian copula against the t copula could not run: it needs both maxima${why}.`];
  }
  const out: string[] = [];
  const stat = `Likelihood-ratio statistic of the Gaussian copula against the t copula: ${fixed(test.statistic, 3)}.`;
  if (test.pValue !== null) {
    const failed = test.failed > 0 ? `; ${test.failed} simulated ${test.failed === 1 ? 'panel' : 'panels'} could not be fitted and ${test.failed === 1 ? 'is' : 'are'} left out` : '';
    out.push(
      `${stat} Its bootstrap p-value is ${pValue(test.pValue)} (${test.replications} panels simulated under the fitted Gaussian model${failed}).`,
      test.pValue < COPULA_TEST_LEVEL
        ? 'The data reject the Gaussian copula at 5% in favour of the fatter joint tail of the t copula.'
        : 'The data do not reject the Gaussian copula at 5%; that is not proof that its tail is right (see the power below).',
    );
  } else {
    out.push(`${stat} No bootstrap was run, so the test has no p-value that can be relied on here.`);
  }
  out.push(
    `Asymptotic p-value (the 50:50 mixture of χ²₀ and χ²₁, Self & Liang 1987): ${pValue(test.pValueAsymptotic)}; with a few dozen years it is far from its nominal level, so the review does not use it.`,
  );
  return out;
}

/** The power of the test at the segment's own cohort sizes and years, in a sentence (and the low-power conclusion). */
export function powerSentence(mc: Pick<ModelComparison, 'power' | 'lrTestGaussianVsT'>): string | null {
  const p = mc.power;
  if (!p) {
    return mc.lrTestGaussianVsT && mc.lrTestGaussianVsT.pValue !== null
      ? 'The power of the test was not studied for this fit.'
      : null;
  }
  const crit = mc.lrTestGaussianVsT?.criticalValue;
  const base = `Power: of ${p.replications} panels simulated from a t copula with ν = ${fixed(p.nu, 2)} at these cohort sizes and years, ${pct(p.rejectRate, 2)} give a statistic above the test's 5% critical value${crit !== null && crit !== undefined ? ` (${fixed(crit, 3)})` : ''}.`;
  return p.rejectRate < LOW_POWER
    ? `${base} This history cannot distinguish the laws, so the Gaussian choice is a convention, not a finding.`
    : `${base} A tail that fat would usually be detected here.`;
}

/** Whether the t copula's nu is weakly identified, in a sentence (null when its profile is informative). */
export function nuIdentificationSentence(t: { nuProfileFlat: boolean | null; nu: number | null } | undefined): string | null {
  if (!t || t.nuProfileFlat !== true) return null;
  return 'The profile likelihood of ν is flat: these years identify the degrees of freedom only weakly, so the value of ν is not a finding; read its interval, not the point.';
}

/** A law's fitted parameters as a short line of text (t: ρ, PD, ν; beta: a, b; logit-normal: μ, σ). */
export function parametersText(law: MixingLaw, seg: Segment): string {
  const e = seg.estimates;
  switch (law) {
    case 'gaussian':
      return `ρ ${rho(e.binomialMle.rho)}, PD ${pd(e.binomialMle.pd)}`;
    case 't':
      return `ρ ${rho(e.tCopula?.rho)}, PD ${pd(e.tCopula?.pd)}, ν ${nuText(e.tCopula?.nu, e.tCopula?.status)}`;
    case 'beta':
      return e.betaMixing?.a === null || e.betaMixing?.b === null ? `a, b infinite (no mixing), PD ${pd(e.betaMixing?.pd)}` : `a ${fixed(e.betaMixing?.a, 3)}, b ${fixed(e.betaMixing?.b, 1)}, PD ${pd(e.betaMixing?.pd)}`;
    case 'logitNormal':
      return `μ ${fixed(e.logitNormal?.mu, 3)}, σ ${fixed(e.logitNormal?.sigma, 3)}, PD ${pd(e.logitNormal?.pd)}`;
  }
}

/** The equivalent ρ of the laws without an asset correlation, with its profile interval. */
export function equivalentRhoText(law: MixingLaw, seg: Segment): string | null {
  const e = law === 'beta' ? seg.estimates.betaMixing : law === 'logitNormal' ? seg.estimates.logitNormal : undefined;
  if (!e) return null;
  return `${smallRho(e.equivalentRho)} ${openInterval(e.intervals.profile)}`;
}

/**
 * Why a segment has no comparison of the laws (no defaults, too few years: the Gaussian fit has no
 * maximum), or which laws are left out of it and why; empty when every law asked for is compared.
 */
export function mixingLawNotes(seg: Segment): string[] {
  const mc = seg.modelComparison;
  if (!mc) return [];
  const out: string[] = [];
  if (mc.laws.length === 0) {
    const reason = (seg.estimates.binomialMle as { reason?: string }).reason;
    out.push(`No law can be compared on this segment: the Gaussian model has no maximum${reason ? ` (${reason.replace(/\.$/, '')})` : ''}.`);
  }
  const compared = new Set(mc.laws.map((l) => l.law));
  const fits: [MixingLaw, { status: string; reason?: string } | undefined][] = [
    ['t', seg.estimates.tCopula],
    ['beta', seg.estimates.betaMixing],
    ['logitNormal', seg.estimates.logitNormal],
  ];
  for (const [law, e] of fits) {
    if (!e || compared.has(law)) continue;
    out.push(`${MIXING_LAW_LABELS[law]}: ${e.status}${e.reason ? `. ${e.reason}` : '.'}`);
  }
  return out;
}


/** The plain name of a law inside a sentence. */
const LAW_IN_SENTENCE: Readonly<Record<MixingLaw, string>> = {
  gaussian: 'the Gaussian copula',
  t: 'the t copula',
  beta: 'beta mixing',
  logitNormal: 'logit-normal mixing',
};

/** The laws of the comparison that carry a PIT (fits stored before it was added carry none). */
export function lawsWithPit(mc: Pick<ModelComparison, 'laws'>): (ModelComparison['laws'][number] & { pit: NonNullable<ModelComparison['laws'][number]['pit']> })[] {
  return mc.laws.filter((l): l is ModelComparison['laws'][number] & { pit: NonNullable<ModelComparison['laws'][number]['pit']> } => !!l.pit);
}

/** What the PIT is, once, in words (the house wording spells the name out before "PIT"). */
export const PIT_INTRODUCTION =
  "The probability integral transform (PIT) of each year's default count under each law at its fitted values: the mid-PIT P(D < d) + P(D = d) / 2 of the count among that year's obligors (granular, so a year without defaults is not pushed to 0). If a law describes the years, its PIT values look like draws from the uniform law on (0, 1): values near 0 or 1 are years the law finds extreme.";

/**
 * Each law's PIT in sentences: the Kolmogorov-Smirnov test of uniformity (on the randomised PIT,
 * with its seed) and what it says at 5%, and the years in the law's outer 1%. A law whose PIT could
 * not be computed keeps its sentence; fits stored before the PIT was added say so once.
 */
export function pitSentences(seg: Segment): string[] {
  const mc = seg.modelComparison;
  if (!mc || mc.laws.length === 0) return [];
  if (mc.laws.every((l) => l.pit === undefined)) return ['This fit was computed before the engine gave each law its probability integral transform (PIT): run the fit again to see it.'];
  const label = (t: number) => seg.observed[t]?.period ?? `period ${t + 1}`;
  const years = (ts: readonly number[]) => ts.map(label).join(', ');
  const out: string[] = [];
  for (const l of mc.laws) {
    const name = LAW_IN_SENTENCE[l.law];
    if (!l.pit) {
      if (l.pit === null) out.push(l.pitNote ?? `The PIT under ${name} could not be computed.`);
      continue;
    }
    const u = l.pit.uniformity;
    const verdict =
      u.pValue < COPULA_TEST_LEVEL
        ? `so the PIT is not uniform at 5%: ${name} does not describe these years' counts`
        : 'no evidence against uniformity at 5% (with so few years the test has little power)';
    const tails = l.pit.tails;
    const share = pct(tails.level, 1);
    const half = pct(tails.level / 2, 1);
    const parts = [
      tails.upper.length > 0 ? `${years(tails.upper)} in the upper tail (P(D ≥ d) below ${half})` : null,
      tails.lower.length > 0 ? `${years(tails.lower)} in the lower tail (P(D ≤ d) below ${half})` : null,
    ].filter(Boolean);
    const tailText = parts.length === 0 ? `no year lies in its outer ${share}` : `years in its outer ${share}: ${parts.join('; ')}`;
    out.push(
      `Under ${name}: Kolmogorov-Smirnov D = ${fixed(u.statistic, 3)}, p = ${pValue(u.pValue)} (exact, on the randomised PIT drawn with seed ${u.seed}), ${verdict}; ${tailText}.`,
    );
  }
  out.push(
    "The test's p-value does not allow for the law's values being fitted to the same years, so it tends to be too large; a law that passes is not shown to be right.",
  );
  return out;
}

/** The PIT table: one row per year (period, defaults of obligors) with each law's mid-PIT and whether the year is in that law's upper or lower tail. */
export function pitRows(seg: Segment): { period: string; defaults: number; obligors: number; cells: { law: MixingLaw; value: number; tail: 'upper' | 'lower' | null }[] }[] {
  const mc = seg.modelComparison;
  if (!mc) return [];
  const laws = lawsWithPit(mc);
  if (laws.length === 0) return [];
  return seg.observed.map((o, t) => ({
    period: o.period,
    defaults: o.defaults,
    obligors: o.obligors,
    cells: laws.map((l) => ({
      law: l.law,
      value: l.pit.values[t],
      tail: l.pit.tails.upper.includes(t) ? ('upper' as const) : l.pit.tails.lower.includes(t) ? ('lower' as const) : null,
    })),
  }));
}
