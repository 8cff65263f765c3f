/**
 * `monitor-backtest` handler: reads the published value and the new years of its segment, backtests
 * them with lib/stats/backtest.ts and returns the writer that stores the result in the job's
 * completion transaction. A failure to compute (a RangeError from lib/stats) is permanent.
 */
import type { Tx } from '@/db/connection';
import { loadBacktestInput, writeBacktest } from '@/lib/dal/evidence-store';
import { AppError } from '@/lib/errors';
import type { MonitorBacktestPayload } from '@/lib/jobs/kinds/monitor-backtest-payload';
import { backtestPublished } from '@/lib/stats/backtest';
import type { JobContext } from '../job-handler';

export async function monitorBacktestHandler(ctx: JobContext<MonitorBacktestPayload>) {
  const input = await loadBacktestInput(ctx.db, ctx.payload);
  await ctx.progress(10, `Backtesting ${input.periods.join(', ')}`);
  let result;
  try {
    result = backtestPublished({ obligors: input.obligors, defaults: input.defaults }, input.pd, input.rho);
  } catch (err) {
    if (err instanceof RangeError) throw new AppError('invalid:backtest', err.message);
    throw err;
  }
  const stored = { ...result, p: input.pd, rho: input.rho, periods: input.periods };
  return async (tx: Tx) => {
    await writeBacktest(tx, ctx.payload.backtestId, stored);
    return { backtestId: ctx.payload.backtestId, years: input.periods.length };
  };
}
