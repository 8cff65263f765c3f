import type { FitSegmentResult } from '@/lib/fits/results';
import { fixed, pct, rho as rhoText } from '@/lib/format';
import {
  equivalentRhoText,
  lrTestSentences,
  mixingLawNotes,
  MIXING_LAW_LABELS,
  nuIdentificationSentence,
  nuText,
  openInterval,
  parametersText,
  powerSentence,
  smallRho,
} from '@/lib/fits/mixing-laws-view';
import type { Section } from './document';

/** The estimates of the other mixing laws, which this section reports instead of the estimates table. */
export const MIXING_LAW_ESTIMATES: ReadonlySet<string> = new Set(['tCopula', 'betaMixing', 'logitNormal']);

/**
 * The challenge of the Gaussian copula as a report section, in the words of the segment review
 * (lib/fits/mixing-laws-view.ts): the laws side by side, the test with its bootstrap p-value first,
 * the power, the identification of nu and the cautions; null when the fit did not run the laws.
 */
export function mixingLawsSection(seg: FitSegmentResult, level: 2 | 3): Section | null {
  const mc = seg.modelComparison;
  if (!mc) return null;
  const t = seg.estimates.tCopula;
  const lv = `${fixed(seg.level * 100, 0)}%`;
  const sentences = [...mixingLawNotes(seg), ...lrTestSentences(mc, t)];
  const power = powerSentence(mc);
  if (power) sentences.push(power);
  if (t && t.status === 'ok' && t.nu !== null) sentences.push(`The t copula's degrees of freedom: nu = ${nuText(t.nu, t.status)}, ${lv} profile interval ${openInterval(t.nuInterval, (v) => fixed(v, 2))}.`);
  const weak = nuIdentificationSentence(t);
  if (weak) sentences.push(weak);
  return {
    heading: 'Mixing laws: the Gaussian copula challenged',
    level,
    blocks: [
      ...(mc.cautions.length ? [{ kind: 'list' as const, tone: 'caution' as const, items: mc.cautions }] : []),
      ...(mc.laws.length
        ? [
            {
              kind: 'table' as const,
              caption: `The laws fitted to the same ${seg.T} years (k free parameters; BIC uses the number of years as the sample size)`,
              columns: ['Law', 'Fitted values', 'Log-likelihood', 'k', 'AIC', 'BIC'],
              rows: mc.laws.map((l) => {
                const eq = equivalentRhoText(l.law, seg);
                const extra =
                  l.law === 't' && t
                    ? `; ${lv} interval of rho ${openInterval(t.intervals.profile)}, of nu ${openInterval(t.nuInterval, (v) => fixed(v, 2))}`
                    : eq
                      ? `; equivalent rho ${eq}`
                      : '';
                return [MIXING_LAW_LABELS[l.law], `${parametersText(l.law, seg)}${extra}`, fixed(l.logLik, 3), String(l.parameters), fixed(l.aic, 2), fixed(l.bic, 2)];
              }),
              align: ['left', 'left', 'right', 'right', 'right', 'right'] as ('left' | 'right')[],
            },
            {
              kind: 'table' as const,
              caption: "What each law implies: default-rate quantiles of an infinitely large pool (with the ratio to the Gaussian law's), the joint default probability and default correlation of two obligors, the tail dependence of the latent variables",
              columns: ['Law', '99% rate', '99.9% rate', 'Joint default', 'Default correlation', 'Tail dependence'],
              rows: mc.laws.map((l) => {
                const ratio = (x: number) => (l.law === 'gaussian' ? '' : ` (x${x.toFixed(2)})`);
                return [
                  MIXING_LAW_LABELS[l.law],
                  `${pct(l.quantile99)}${ratio(l.quantile99Ratio)}`,
                  `${pct(l.quantile999)}${ratio(l.quantile999Ratio)}`,
                  l.jointDefault.toExponential(3),
                  smallRho(l.defaultCorrelation),
                  l.tailDependence === null ? 'none' : rhoText(l.tailDependence),
                ];
              }),
              align: ['left', 'right', 'right', 'right', 'right', 'right'] as ('left' | 'right')[],
            },
          ]
        : []),
      { kind: 'list' as const, items: sentences },
    ],
  };
}
