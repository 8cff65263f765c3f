import { ScrollBox } from '@/components/layout/scroll-box';
import { interval, level, pd, rho } from '@/lib/format';
import type { ReviewContext } from './types';

/** The same segment fitted over other windows (whole, recent, without the worst year...). */
export function WindowsSection({ seg }: ReviewContext) {
  return (
    <div>
      <ScrollBox label="Window comparison">
        <table className="table text-sm" data-testid="windows-table">
          <thead>
            <tr>
              <th>Window</th>
              <th className="text-right">T</th>
              <th className="text-right">ρ (likelihood)</th>
              <th className="text-right">Profile interval</th>
              <th className="text-right">PD</th>
              <th className="text-right">ρ (corrected moments)</th>
              <th className="text-right">ρ (joint default)</th>
            </tr>
          </thead>
          <tbody>
            {seg.windows.map((w) => (
              <tr key={w.label}>
                <td>
                  {w.label}{' '}
                  <span className="text-xs text-[var(--color-muted)] whitespace-nowrap">
                    {w.periods[0]}–{w.periods[w.periods.length - 1]}
                  </span>
                  {w.warnings.includes('at-boundary') ? <span className="badge ml-1 text-xs">ρ = 0</span> : null}
                </td>
                <td className="num text-right">{w.T}</td>
                <td className="num text-right">{rho(w.binomialMle.rho)}</td>
                <td className="num text-right whitespace-nowrap">{interval(w.binomialMle.profile?.lower, w.binomialMle.profile?.upper)}</td>
                <td className="num text-right">{pd(w.binomialMle.pd)}</td>
                <td className="num text-right">{rho(w.momentVarianceCorrected)}</td>
                <td className="num text-right">{rho(w.jointDefault)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollBox>
      <p className="mt-1 text-xs text-[var(--color-muted)]">
        Each window fitted by the same engine at {level(seg.level)}. Shorter windows give wider intervals; a large move when one year is left
        out means the estimate rests on that year.
      </p>
    </div>
  );
}
