/**
 * Window comparison of a fit run: the same segment fitted over alternative windows of its periods
 * (without the worst period, the last 10, each half), each by the engine's fitPanel on the
 * sub-panel, so that a reviewer sees how much the estimate rests on particular years. No numerics
 * here: choosing the windows and picking the figures shown is all this file does.
 */
import { fitPanel, type PanelInput, type SegmentFit } from '@/lib/stats/fit-panel';
import type { WindowResult } from './results';

/** The windows compared, as index lists into the segment's periods (the whole window first). */
export function alternativeWindows(periods: readonly string[], rates: readonly number[]): { label: string; idx: number[] }[] {
  const T = periods.length;
  const all = periods.map((_, i) => i);
  const out = [{ label: 'Whole window', idx: all }];
  if (T >= 6) {
    let worst = 0;
    for (let i = 1; i < T; i++) if (rates[i] > rates[worst]) worst = i;
    out.push({ label: `Without the worst period (${periods[worst]})`, idx: all.filter((i) => i !== worst) });
  }
  if (T > 10) out.push({ label: 'Last 10 periods', idx: all.slice(T - 10) });
  if (T >= 12) {
    const half = Math.floor(T / 2);
    out.push({ label: 'First half', idx: all.slice(0, half) });
    out.push({ label: 'Second half', idx: all.slice(half) });
  }
  return out;
}

function summarise(label: string, fit: SegmentFit): WindowResult {
  const mle = fit.estimates.binomialMle;
  return {
    label,
    periods: fit.periods,
    T: fit.T,
    binomialMle: {
      rho: mle.rho,
      pd: mle.pd,
      status: mle.status,
      profile: mle.intervals.profile ? { lower: mle.intervals.profile.lower, upper: mle.intervals.profile.upper } : null,
    },
    momentVarianceCorrected: fit.estimates.momentVarianceCorrected?.rho ?? null,
    jointDefault: fit.estimates.jointDefault?.rho ?? null,
    warnings: fit.warnings.map((w) => w.code),
  };
}

/**
 * The window comparison of one segment. `whole` is the segment's own fit over the full window
 * (reused, not recomputed); the other windows are fitted with fitPanel at the same level, the
 * independent model alone.
 */
export function compareWindows(input: PanelInput, whole: SegmentFit, level: number): WindowResult[] {
  const rates = input.defaults.map((d, i) => d / input.obligors[i]);
  return alternativeWindows(input.periods, rates).map(({ label, idx }, k) => {
    if (k === 0) return summarise(label, whole);
    const sub: PanelInput = {
      segment: input.segment,
      periods: idx.map((i) => input.periods[i]),
      obligors: idx.map((i) => input.obligors[i]),
      defaults: idx.map((i) => input.defaults[i]),
    };
    // the independent model's figures only: no AR(1) model and no stability block per window
    return summarise(label, fitPanel(sub, { level, models: ['independent'], stability: null }));
  });
}
