import type { FitSegmentResult } from '@/lib/fits/results';
import { fixed, integer, pct, rho as rhoText } from '@/lib/format';
import {
  equivalentRhoText,
  lrTestSentences,
  mixingLawNotes,
  MIXING_LAW_LABELS,
  nuIdentificationSentence,
  nuText,
  openInterval,
  parametersText,
  PIT_INTRODUCTION,
  pitRows,
  pitSentences,
  powerSentence,
  smallRho,
} from '@/lib/fits/mixing-laws-view';
import type { Section } from './document';

/** The estimates of the other mixing laws, which this section reports instead of the estimates table. */
export const MIXING_LAW_ESTIMATES: ReadonlySet<string> = new Set(['tCopula', 'betaMixing', 'logitNormal']);

/**
 * The challenge of the Gaussian copula as a report section, in the words of the segment review
 * (lib/fits/mixing-laws-view.ts): the laws side by side, the test with its bootstrap p-value first,
 * the power, the identification of nu, the cautions and each law's probability integral transform of
 * every year (a table and its uniformity test and tail years in sentences); null when the fit did not
 * run the laws.
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
      ...pitBlocks(seg),
    ],
  };
}

/** Each law's probability integral transform: the introduction, the per-year table and the sentences (the review's words). */
function pitBlocks(seg: FitSegmentResult): Section['blocks'] {
  const text = pitSentences(seg);
  if (text.length === 0) return [];
  const rows = pitRows(seg);
  if (rows.length === 0) return [{ kind: 'list' as const, items: text }];
  return [
    { kind: 'p' as const, text: PIT_INTRODUCTION },
    {
      kind: 'table' as const,
      caption: "Probability integral transform (PIT) of each year's default count under each law (mid-PIT; a year in a law's outer 1% is marked upper or lower)",
      columns: ['Year', 'Defaults', ...rows[0].cells.map((c) => MIXING_LAW_LABELS[c.law])],
      rows: rows.map((r) => [r.period, `${integer(r.defaults)} of ${integer(r.obligors)}`, ...r.cells.map((c) => `${fixed(c.value, 3)}${c.tail ? ` (${c.tail} tail)` : ''}`)]),
      align: ['left', 'right', ...rows[0].cells.map(() => 'right' as const)] as ('left' | 'right')[],
    },
    { kind: 'list' as const, items: text },
  ];
}
