import { integer, pct } from '@/lib/format';
import type { BacktestResult } from '@/lib/stats/backtest';

/**
 * What a backtest of a published value on new years says, in words: the verdict and one sentence
 * per year. The numbers come from lib/stats/backtest.ts; the thresholds are common practice for a
 * traffic light (a 99% exceedance or a count that unlikely is red, a 95% one amber).
 */
export type BacktestVerdict = 'consistent' | 'watch' | 'breach';

export type StoredBacktest = BacktestResult & { p: number; rho: number; periods: string[] };

const prob = (x: number) => (x < 0.0001 ? 'below 0.0001' : x.toFixed(4));

export function backtestVerdict(r: BacktestResult): BacktestVerdict {
  const minTail = Math.min(...r.years.map((y) => y.tailProbability));
  if (r.exceedances.above99 > 0 || minTail < 0.01) return 'breach';
  if (r.exceedances.above95 > 0 || minTail < 0.05) return 'watch';
  return 'consistent';
}

export function backtestSentences(r: StoredBacktest): { verdict: BacktestVerdict; summary: string; years: string[] } {
  const verdict = backtestVerdict(r);
  const n = r.years.length;
  const summary =
    verdict === 'consistent'
      ? `The ${n} new year${n === 1 ? '' : 's'} agree${n === 1 ? 's' : ''} with the published value: no default rate above its 95% quantile, and no default count that unlikely under it.`
      : verdict === 'watch'
        ? `Watch: ${r.exceedances.above95} of ${n} new year${n === 1 ? '' : 's'} above the 95% quantile of the published value (${r.exceedances.expected95.toFixed(2)} expected; at least that many has probability ${prob(r.exceedances.pAtLeast95)}).`
        : `The new years challenge the published value: ${r.exceedances.above99} above its 99% quantile (${r.exceedances.expected99.toFixed(2)} expected), and the least likely year's count has probability ${prob(Math.min(...r.years.map((y) => y.tailProbability)))} or less. Review the value with the new data.`;
  const years = r.years.map(
    (y, i) =>
      `${r.periods[i] ?? `year ${i + 1}`}: ${integer(y.defaults)} defaults of ${integer(y.obligors)} (${pct(y.rate)}) against the 95% and 99% quantiles ${pct(y.q95)} and ${pct(y.q99)}; P(at least ${integer(y.defaults)} defaults) = ${prob(y.tailProbability)}; log-likelihood ${y.logLik.toFixed(3)}.`,
  );
  return { verdict, summary, years };
}
