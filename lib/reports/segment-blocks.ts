import type { FitSegmentResult } from '@/lib/fits/results';
import { count, fixed, interval, pct, pd as pdText, pValue, rho as rhoText } from '@/lib/format';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { defaultRateChart, profileChart } from './charts';
import type { Block, Section } from './document';
import { MIXING_LAW_ESTIMATES, mixingLawsSection } from './mixing-laws-blocks';

/**
 * The evidence of one fitted segment as report sections: its data, every estimator with its
 * intervals, the charts, the diagnostics and stability in sentences, what the estimate implies,
 * and the estimator audit. Shared by the fit report (each segment) and the assumption report (its
 * segment, from its frozen fit). Reads the engine's result shape (lib/fits/results.ts) and is
 * tolerant of blocks a newer engine adds (other estimators, intervals, stability): each is
 * reported when present, by its name.
 */
type AnyInterval = { level?: number; lower?: number; upper?: number } | null | undefined;
type AnyEstimate = { rho: number | null; pd: number | null; status?: string; reason?: string; intervals?: Record<string, AnyInterval> };

const intervalNames: Record<string, string> = { profile: 'profile', wald: 'Wald', bootstrap: 'bootstrap', chiSquare: 'chi-square' };

export function estimatesTable(seg: FitSegmentResult): Block {
  // the other mixing laws have a section of their own (mixing-laws-blocks.ts)
  const entries = Object.entries(seg.estimates as unknown as Record<string, AnyEstimate>).filter(([key]) => !MIXING_LAW_ESTIMATES.has(key));
  const rows = entries.map(([key, e]) => {
    const ivs = Object.entries(e.intervals ?? {})
      .filter(([, iv]) => iv && typeof iv.lower === 'number' && typeof iv.upper === 'number')
      .map(([k, iv]) => `${intervalNames[k] ?? k} ${interval(iv!.lower, iv!.upper)}`);
    return [
      estimatorLabel(key),
      e.rho === null ? '—' : rhoText(e.rho),
      e.pd === null ? '—' : pdText(e.pd),
      ivs.join('; ') || '—',
      e.status === 'ok' || !e.status ? 'ok' : `${e.status}${e.reason ? `: ${e.reason}` : ''}`,
    ];
  });
  return {
    kind: 'table',
    caption: `Every estimator at the ${fixed(seg.level * 100, 0)}% level`,
    columns: ['Estimator', 'rho', 'PD', 'Intervals', 'Status'],
    rows,
    align: ['left', 'right', 'right', 'left', 'left'],
  };
}

/** The diagnostics of the fit in sentences. */
export function diagnosticsSentences(seg: FitSegmentResult): string[] {
  const d = seg.diagnostics;
  const T = seg.T;
  const out: string[] = [];
  out.push(
    d.zeroDefaultPeriods
      ? `${count(d.zeroDefaultPeriods, 'of the years has', 'of the years have')} no default (of ${T}): the closed-form estimator is undefined there and the moment estimators lose precision; the likelihood uses them correctly.`
      : `Every one of the ${T} years has at least one default.`,
  );
  if (d.lrTestRhoZero) {
    out.push(
      `Likelihood-ratio test of rho = 0: statistic ${fixed(d.lrTestRhoZero.statistic, 3)}, p-value ${pValue(d.lrTestRhoZero.pValue)} (${d.lrTestRhoZero.pValue < 0.05 ? 'the data reject independence at 5%' : 'the data do not reject independence at 5%'}).`,
    );
  }
  if (d.lag1Autocorrelation !== null) {
    out.push(
      `Lag-1 autocorrelation of the implied factor: ${fixed(d.lag1Autocorrelation, 3)} against a 5% band of ±${fixed(d.autocorrelationThreshold, 3)} (${
        Math.abs(d.lag1Autocorrelation) > d.autocorrelationThreshold ? 'material: the years may not be independent' : 'within the band'
      }).`,
    );
  } else if (d.autocorrelationNote) {
    out.push(`The implied factor's autocorrelation could not be computed: ${d.autocorrelationNote}`);
  }
  if (d.pitSerialTest) {
    out.push(
      `Serial dependence of the PIT of the yearly default counts: ${fixed(d.pitSerialTest.statistic, 3)} against ±${fixed(d.pitSerialTest.threshold, 3)} (${d.pitSerialTest.material ? 'material' : 'within the band'}).`,
    );
  } else if (d.pitSerialNote) {
    out.push(`The PIT serial test could not run: ${d.pitSerialNote}`);
  }
  if (d.exceedances) {
    out.push(
      `${count(d.exceedances.above95, 'year')} above the fitted 95% default-rate quantile (${pct(d.exceedances.q95)}) and ${count(d.exceedances.above99, 'year')} above the 99% one (${pct(d.exceedances.q99)}); about ${fixed(0.05 * T, 1)} and ${fixed(0.01 * T, 1)} are to be expected.`,
    );
  } else if (d.fittedNote) {
    out.push(d.fittedNote);
  }
  return out;
}

/** The stability block of a newer engine (DESIGN.md's names), in sentences; [] when absent. */
export function stabilitySentences(seg: FitSegmentResult): string[] {
  const s = (seg as unknown as { stability?: Record<string, unknown> }).stability;
  if (!s || typeof s !== 'object') return [];
  const out: string[] = [];
  const jk = s.jackknife as { mostInfluential?: { period: string; estimator: string; change: number } | null; status?: string; message?: string } | undefined;
  if (jk?.mostInfluential) {
    out.push(`Leave-one-year-out: the most influential year is ${jk.mostInfluential.period}; leaving it out moves ${estimatorLabel(jk.mostInfluential.estimator)} by ${fixed(jk.mostInfluential.change, 4)}.`);
  } else if (jk?.message) out.push(`Leave-one-year-out: ${jk.message}`);
  const bt = s.breakTest as { splitYear?: string | number; pValue?: number; statistic?: number; status?: string; message?: string } | undefined;
  if (bt && typeof bt.pValue === 'number') {
    out.push(
      `Structural break (sup-LR): the strongest split is before ${bt.splitYear}, bootstrap p-value ${pValue(bt.pValue)} (${bt.pValue < 0.05 ? 'a break at 5%' : 'no break at 5%'}).`,
    );
  } else if (bt?.message) out.push(`Structural break: ${bt.message}`);
  const rw = s.rolling as { window?: number; entries?: { from: string; to: string; rho: number | null }[]; message?: string } | undefined;
  if (rw?.entries?.length) {
    const vals = rw.entries.map((e) => e.rho).filter((x): x is number => typeof x === 'number');
    if (vals.length) out.push(`Rolling ${rw.window}-year windows: rho from ${rhoText(Math.min(...vals))} to ${rhoText(Math.max(...vals))} over ${count(rw.entries.length, 'window')}.`);
  } else if (rw?.message) out.push(`Rolling windows: ${rw.message}`);
  return out;
}

export function auditBlocks(seg: FitSegmentResult): Block[] {
  const a = seg.estimatorAudit;
  if (!a) return [{ kind: 'p', text: 'No small-sample simulation study was requested for this fit.' }];
  const rows = Object.entries(a.estimators).map(([k, e]) => [
    estimatorLabel(k),
    fixed(e.bias, 4),
    fixed(e.sd, 4),
    fixed(e.rmse, 4),
    `${e.defined} of ${a.replications}`,
  ]);
  return [
    {
      kind: 'p',
      text: `${count(a.replications, 'panel')} simulated at the fitted values (PD ${pdText(a.truth.pd)}, rho ${rhoText(a.truth.rho)}) with this segment's cohorts and ${a.periods} years (seed ${a.seed}): how each estimator behaves on data like these.`,
    },
    { kind: 'table', caption: 'Small-sample simulation study', columns: ['Estimator', 'Bias', 'SD', 'RMSE', 'With a value'], rows, align: ['left', 'right', 'right', 'right', 'right'] },
    {
      kind: 'p',
      text: `Coverage of the ${fixed(a.coverage.profile.level * 100, 0)}% intervals: profile ${pct(a.coverage.profile.coverage)} (Monte Carlo s.e. ${pct(a.coverage.profile.mcse)}), Wald ${pct(a.coverage.wald.coverage)} (s.e. ${pct(a.coverage.wald.mcse)}).`,
    },
  ];
}

/** Every section of one segment's evidence. */
export function segmentSections(seg: FitSegmentResult, opts: { level: 2 | 3 } = { level: 3 }): Section[] {
  const b = seg.estimates.binomialMle;
  const profile = b.intervals.profile;
  const charts: Block[] = [{ kind: 'chart', chart: defaultRateChart(seg.observed, seg.diagnostics.bands) }];
  const pc = profileChart(seg.profileCurve, seg.profileCutoff, b.rho, profile ? { lower: profile.lower, upper: profile.upper, level: profile.level } : null);
  if (pc) charts.push({ kind: 'chart', chart: pc });
  const imp = seg.implications;
  const stability = stabilitySentences(seg);
  const mixingLaws = mixingLawsSection(seg, opts.level);
  return [
    {
      heading: `Data of ${seg.segment}`,
      level: opts.level,
      blocks: [
        {
          kind: 'table',
          caption: `${seg.T} annual cohorts, ${seg.periods[0]} to ${seg.periods[seg.periods.length - 1]}`,
          columns: ['Year', 'Obligors', 'Defaults', 'Default rate'],
          rows: seg.observed.map((o) => [o.period, o.obligors.toLocaleString('en-GB'), o.defaults.toLocaleString('en-GB'), pct(o.dr)]),
          align: ['left', 'right', 'right', 'right'],
        },
      ],
    },
    { heading: 'Estimates and intervals', level: opts.level, blocks: [estimatesTable(seg)] },
    { heading: 'Charts', level: opts.level, blocks: charts },
    {
      heading: 'Diagnostics',
      level: opts.level,
      blocks: [
        { kind: 'list', items: diagnosticsSentences(seg) },
        ...(seg.warnings.length ? [{ kind: 'list' as const, tone: 'caution' as const, items: seg.warnings.map((w) => w.message) }] : []),
      ],
    },
    ...(stability.length ? [{ heading: 'Stability across the window', level: opts.level, blocks: [{ kind: 'list' as const, items: stability }] }] : []),
    ...(mixingLaws ? [mixingLaws] : []),
    ...(imp
      ? [
          {
            heading: 'What the estimate implies',
            level: opts.level,
            blocks: [
              {
                kind: 'kv' as const,
                rows: [
                  ['99.9% default-rate quantile', pct(imp.quantile999)],
                  ['Capital K at the estimate', pct(imp.capital.atEstimate)],
                  ['Capital K at the interval ends', `${pct(imp.capital.atLower)} to ${pct(imp.capital.atUpper)}`],
                  ['Convention', imp.convention],
                  ['Supervisory correlation', imp.supervisory ? `${rhoText(imp.supervisory.rho)} (${imp.supervisory.assetClass}), capital ${pct(imp.supervisory.capital)}` : 'no asset class set'],
                ] as [string, string][],
              },
            ],
          },
        ]
      : []),
    { heading: 'Small-sample simulation study', level: opts.level, blocks: auditBlocks(seg) },
  ];
}
