import { z } from 'zod';

/**
 * `monitor-backtest`: backtests a published assumption's (p, rho) on the years of a newer dataset of
 * its segment (workers/handlers/monitor-backtest.ts, lib/stats/backtest.ts). Queued by the
 * scheduler's evidence sweep (lib/dal/evidence-store.ts) with its evidence_backtests row.
 */
export const MONITOR_BACKTEST_JOB = 'monitor-backtest';

export const monitorBacktestPayloadSchema = z.object({
  backtestId: z.number().int().positive(),
  versionId: z.number().int().positive(),
  datasetId: z.number().int().positive(),
  periods: z.array(z.string().regex(/^\d{4}$/)).min(1),
});
export type MonitorBacktestPayload = z.infer<typeof monitorBacktestPayloadSchema>;
