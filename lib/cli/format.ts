/**
 * The readable (non-JSON) output of `fit`: one block per segment with the five estimators, the
 * intervals of binomialMle, the main diagnostics and the warnings, then the cautions.
 */
import { ESTIMATOR_KEYS } from '../stats/estimators/types';
import { ESTIMATOR_LABELS } from '../stats/estimators';
import type { FitDocument } from './fit';

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
      `Segment ${s.segment}: T = ${s.T} (${s.periods[0]}-${s.periods[s.periods.length - 1]}), intervals at ${(100 * s.level).toFixed(1).replace(/\.0$/, '')}%, ${s.timing.ms.toFixed(1)} ms`,
    );
    const rows: string[][] = [['estimator', 'rho', 'pd', 'status']];
    for (const key of ESTIMATOR_KEYS) {
      const e = s.estimates[key];
      rows.push([`${key} (${ESTIMATOR_LABELS[key]})`, num(e.rho), pct(e.pd), e.status + (e.reason ? `: ${e.reason}` : '')]);
    }
    const widths = [0, 1, 2].map((c) => Math.max(...rows.map((r) => r[c].length)));
    for (const r of rows) lines.push(`  ${pad(r[0], widths[0])}  ${pad(r[1], widths[1])}  ${pad(r[2], widths[2])}  ${r[3]}`);
    lines.push(`  binomialMle log-likelihood ${num(mle.logLik, 3)}${mle.atBoundary ? ' (maximum at rho = 0)' : ''}`);
    const iv = mle.intervals;
    lines.push(`  profile interval    ${iv.profile ? `[${num(iv.profile.lower)}, ${num(iv.profile.upper)}]${iv.profile.upperAtSearchLimit ? ' (upper end at the search limit)' : ''}` : '-'}`);
    lines.push(`  Wald (logit) interval ${iv.wald ? `[${num(iv.wald.lower)}, ${num(iv.wald.upper)}], se ${num(iv.wald.se)}` : '- (none at the boundary or without an estimate)'}`);
    if (iv.bootstrap) {
      lines.push(
        `  bootstrap interval  [${num(iv.bootstrap.lower)}, ${num(iv.bootstrap.upper)}], bias ${num(iv.bootstrap.bias)}, B = ${iv.bootstrap.replications}, seed ${iv.bootstrap.seed}, failed ${iv.bootstrap.failed}`,
      );
    }
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
