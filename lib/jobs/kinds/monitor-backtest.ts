import { markBacktestFailed } from '@/lib/dal/backtest-failures';
import { defineJobKind } from '../job-kind';
import { MONITOR_BACKTEST_JOB, monitorBacktestPayloadSchema } from './monitor-backtest-payload';

/** The `monitor-backtest` job kind (monitor-backtest-payload.ts) and what happens when one of its jobs is given up. */
export const monitorBacktestJob = defineJobKind(MONITOR_BACKTEST_JOB, monitorBacktestPayloadSchema, {
  onGiveUp: async (tx, end) => {
    const p = monitorBacktestPayloadSchema.safeParse(end.payload);
    if (!p.success) return;
    await markBacktestFailed(tx, p.data.backtestId, end.status === 'cancelled' ? 'The backtest was cancelled.' : `The backtest did not finish: ${end.error ?? 'no detail'}.`);
  },
});
