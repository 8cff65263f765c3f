/**
 * The readable (non-JSON) output of `fit`: one block per segment with the estimators of the models
 * run and each one's interval, the intervals of binomialMle, the AR(1) model's phi and its test,
 * the stability across the window, the main diagnostics, the warnings and the slowest stages, then the cautions.
 */
import { ESTIMATOR_KEYS } from '../stats/estimators/types';
import { ESTIMATOR_LABELS } from '../stats/estimators';
import type { SegmentEstimates, TimedSegmentFit } from '../stats/fit-panel';
import type { FitDocument } from './document';

function num(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined) return '-';
  if (v === 0) return '0';
  return Math.abs(v) >= 1e-3 ? v.toFixed(digits) : v.toExponential(2);
}

function pct(v: number | null | undefined): string {
  return v === null || v === undefined ? '-' : `${(100 * v).toFixed(2)}%`;
}

function pad(s: string, w: number): string {
  return s.length >= w ? s : s + ' '.repeat(w - s.length);
}

function range(iv: { lower: number; upper: number } | null | undefined): string {
  return iv ? `[${num(iv.lower)}, ${num(iv.upper)}]` : '';
}

/** The interval column of an estimator: the one it has, by name. */
function intervalOf(key: keyof SegmentEstimates, e: NonNullable<SegmentEstimates[keyof SegmentEstimates]>): string {
  if (key === 'binomialMle' || key === 'ar1Mle') {
    const iv = (e as SegmentEstimates['binomialMle' | 'ar1Mle'])!.intervals.profile;
    return iv ? `profile ${range(iv)}` : '';
  }
  if (key === 'vasicekMle') {
    const iv = (e as NonNullable<SegmentEstimates['vasicekMle']>).intervals.chiSquare;
    return iv ? `chi-square ${range(iv)}` : '';
  }
  const b = (e as NonNullable<SegmentEstimates['momentVariance']>).intervals.bootstrap;
  return b ? `bootstrap ${range(b)} (B ${b.replications}, clipped ${b.clipped}, undefined ${b.undefined})` : '';
}

/** The AR(1) model and the stability block, in lines. */
function timeLines(s: TimedSegmentFit): string[] {
  const lines: string[] = [];
  const a = s.estimates.ar1Mle;
  if (a && a.rho !== null) {
    const phi = a.phi === null ? 'phi not identified (rho = 0)' : `phi ${num(a.phi, 3)}${a.phiInterval ? ` ${range(a.phiInterval)}` : ''}`;
    const lr = a.lrTestPhi0 ? `; LR test of phi = 0: statistic ${num(a.lrTestPhi0.statistic, 3)}, p-value ${num(a.lrTestPhi0.pValue)}` : '';
    lines.push(`  AR(1) factor: ${phi}${lr}`);
  }
  const st = s.stability;
  if (st) {
    const j = st.jackknife;
    if (j.status === 'ok' && j.mostInfluential) {
      lines.push(`  jackknife: without ${j.mostInfluential.period} binomialMle's rho moves by ${num(j.mostInfluential.change)} (the most influential period); bias ${num(j.estimators.binomialMle?.bias)}, se ${num(j.estimators.binomialMle?.se)}`);
    } else if (j.status === 'undefined') lines.push(`  jackknife: ${j.reason}`);
    const b = st.breakTest;
    if (b.status === 'undefined') lines.push(`  break test: ${b.reason}`);
    else {
      lines.push(
        `  break test: largest LR statistic ${num(b.statistic, 3)} with the second part from ${b.splitYear}; ${b.pValue === null ? 'no p-value (run with --bootstrap B)' : `bootstrap p-value ${num(b.pValue, 3)} (B = ${b.replications}${b.failed ? `, ${b.failed} failed` : ''})`}`,
      );
    }
    const r = st.rolling;
    if (r.status === 'undefined') lines.push(`  rolling window: ${r.reason}`);
    else {
      const values = r.entries.map((e) => e.rho).filter((x): x is number => x !== null);
      lines.push(
        `  rolling window of ${r.window}: ${r.entries.length} window${r.entries.length === 1 ? '' : 's'}, binomialMle's rho from ${num(Math.min(...values))} to ${num(Math.max(...values))}${values.length < r.entries.length ? ` (${r.entries.length - values.length} without an estimate)` : ''}`,
      );
    }
  }
  return lines;
}

/** The slowest stages, for a first look at where the time went (the JSON has them all). */
function stagesLine(s: TimedSegmentFit): string | null {
  const entries = Object.entries(s.timing.stages ?? {}).sort((x, y) => y[1] - x[1]);
  if (entries.length === 0) return null;
  return `  slowest stages: ${entries
    .slice(0, 5)
    .map(([k, ms]) => `${k} ${ms.toFixed(1)} ms`)
    .join(', ')}`;
}

/** Renders the document as plain text tables. */
export function formatTable(doc: FitDocument): string {
  const lines: string[] = [`Rhobook engine ${doc.engine.version}`];
  // Fitted and failed segments in the order of the file.
  const items: ({ kind: 'fit'; s: FitDocument['segments'][number] } | { kind: 'failed'; f: FitDocument['failures'][number] })[] = [];
  let next = 0;
  const total = doc.segments.length + doc.failures.length;
  for (let position = 0; position < total; position++) {
    const f = doc.failures.find((x) => x.position === position);
    if (f) items.push({ kind: 'failed', f });
    else if (next < doc.segments.length) items.push({ kind: 'fit', s: doc.segments[next++] });
  }
  for (const item of items) {
    if (item.kind === 'failed') {
      lines.push('');
      lines.push(`Segment ${item.f.segment}: FAILED, not fitted: ${item.f.reason}`);
      continue;
    }
    const s = item.s;
    const mle = s.estimates.binomialMle;
    lines.push('');
    lines.push(
      `Segment ${s.segment}: T = ${s.T} (${s.periods[0]}-${s.periods[s.periods.length - 1]}), intervals at ${(100 * s.level).toFixed(1).replace(/\.0$/, '')}%, models ${s.models.join(', ')}, ${s.timing.ms.toFixed(1)} ms`,
    );
    const rows: string[][] = [['estimator', 'rho', 'pd', 'interval', 'status']];
    for (const key of ESTIMATOR_KEYS) {
      const e = s.estimates[key];
      if (!e) continue;
      rows.push([`${key} (${ESTIMATOR_LABELS[key]})`, num(e.rho), pct(e.pd), intervalOf(key, e), e.status + (e.reason ? `: ${e.reason}` : '')]);
    }
    const widths = [0, 1, 2, 3].map((c) => Math.max(...rows.map((r) => r[c].length)));
    for (const r of rows) lines.push(`  ${pad(r[0], widths[0])}  ${pad(r[1], widths[1])}  ${pad(r[2], widths[2])}  ${pad(r[3], widths[3])}  ${r[4]}`);
    lines.push(`  binomialMle log-likelihood ${num(mle.logLik, 3)}${mle.atBoundary ? ' (maximum at rho = 0)' : ''}`);
    const iv = mle.intervals;
    lines.push(`  profile interval    ${iv.profile ? `[${num(iv.profile.lower)}, ${num(iv.profile.upper)}]${iv.profile.upperAtSearchLimit ? ' (upper end at the search limit)' : ''}` : '-'}`);
    lines.push(`  Wald (logit) interval ${iv.wald ? `[${num(iv.wald.lower)}, ${num(iv.wald.upper)}], se ${num(iv.wald.se)}` : '- (none at the boundary or without an estimate)'}`);
    if (iv.bootstrap) {
      lines.push(
        `  bootstrap interval  [${num(iv.bootstrap.lower)}, ${num(iv.bootstrap.upper)}], bias ${num(iv.bootstrap.bias)}, B = ${iv.bootstrap.replications}, seed ${iv.bootstrap.seed}, failed ${iv.bootstrap.failed}`,
      );
    }
    lines.push(...timeLines(s));
    const d = s.diagnostics;
    if (d.lrTestRhoZero) lines.push(`  LR test of rho = 0: statistic ${num(d.lrTestRhoZero.statistic, 3)}, p-value ${num(d.lrTestRhoZero.pValue)}`);
    lines.push(`  zero-default periods ${d.zeroDefaultPeriods}; implied-factor lag-1 autocorrelation ${num(d.lag1Autocorrelation, 2)}`);
    if (d.exceedances) lines.push(`  periods above the fitted 95% / 99% default-rate quantiles: ${d.exceedances.above95} / ${d.exceedances.above99}`);
    if (s.implications) {
      const im = s.implications;
      lines.push(`  99.9% default-rate quantile ${pct(im.quantile999)}; capital K at estimate ${pct(im.capital.atEstimate)}, at interval ends ${pct(im.capital.atLower)} - ${pct(im.capital.atUpper)}`);
      if (im.supervisory) lines.push(`  supervisory rho (${im.supervisory.assetClass}) ${num(im.supervisory.rho)}, capital K ${pct(im.supervisory.capital)}`);
      lines.push(`  (${im.convention})`);
    }
    if (d.lrTestPhi0 === null && d.lrTestPhi0Note) lines.push(`  LR test of phi = 0 (serial dependence): ${d.lrTestPhi0Note}`);
    for (const w of s.warnings) lines.push(`  ! ${w.message}`);
    const post = doc.segments[items.filter((x) => x.kind === 'fit').indexOf(item)]?.posterior;
    if (post) {
      lines.push(
        post.status === 'ok'
          ? `  posterior of rho (prior ${post.prior.rho}, p ${post.prior.pd}): median ${num(post.median)}, mean ${num(post.mean)}, ${(100 * post.level).toFixed(0)}% [${num(post.lower)}, ${num(post.upper)}], HPD [${num(post.hpdLower)}, ${num(post.hpdUpper)}]; ${post.influence}`
          : `  posterior of rho: not computed: ${post.reason}`,
      );
    }
    const prudent = doc.segments[items.filter((x) => x.kind === 'fit').indexOf(item)]?.prudentPd;
    if (prudent) {
      lines.push(prudent.status === 'undefined' ? `  most prudent PD: not computed: ${prudent.reason}` : `  most prudent PD at rho ${num(prudent.rho)}, confidence ${prudent.confidence}: ${pct(prudent.upper)}`);
    }
    const stages = stagesLine(s);
    if (stages) lines.push(stages);
  }
  if (doc.group) {
    const g = doc.group;
    lines.push('', `Grades ${g.segments.join(', ')} under one factor: ${g.status}${g.reason ? `: ${g.reason}` : ''}`);
    if (g.commonRho) {
      const iv = g.commonRho.interval;
      lines.push(`  common rho ${num(g.commonRho.rho)} [${num(iv.lower)}, ${num(iv.upper)}], log-likelihood ${num(g.commonRho.logLik, 3)}`);
      for (const s of g.segments) lines.push(`  ${pad(s, 16)} PD ${pct(g.pds![s].pd)} [${pct(g.pds![s].lower)}, ${pct(g.pds![s].upper)}], own rho ${num(g.gradeRho![s])}, alone: rho ${num(g.single[s]?.rho)}, PD ${pct(g.single[s]?.pd)}`);
      lines.push(`  LR test of one common rho: statistic ${num(g.lrTest!.statistic, 3)}, df ${g.lrTest!.df}, p-value ${num(g.lrTest!.pValue)}`);
      const a = g.estimatorAudit;
      if (a) lines.push(`  audit of the common rho (R = ${a.replications}, seed ${a.seed}): bias ${num(a.bias)}, sd ${num(a.sd)}, interval coverage ${pct(a.coverage)} (MCSE ${pct(a.coverageMcse)})`);
      for (const w of g.warnings) lines.push(`  ! ${w.message}`);
    }
  }
  if (doc.pairs) {
    const m = doc.pairs;
    lines.push('', 'Factor correlations between segments (maximum likelihood, margins at their own estimates):');
    for (const e of m.entries) {
      lines.push(`  ${pad(`${e.a} - ${e.b}`, 30)} ${e.r === null ? `- (${e.reason})` : `r ${num(e.r)} [${num(e.lower)}, ${num(e.upper)}], moment ${num(e.moment)}`}`);
    }
    lines.push(`  ${m.nearestNote}`);
  }
  lines.push('', 'Cautions:');
  for (const c of doc.cautions) lines.push(`  - ${c}`);
  return lines.join('\n');
}
