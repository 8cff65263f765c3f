import { ScrollBox } from '@/components/layout/scroll-box';
import { fixed, level, rho, signed } from '@/lib/format';
import type { BreakTestDto, JackknifeDto, Stability } from '@/lib/stats/fit-panel';
import { estimatorLabel } from '@/lib/stats/estimators/types';
import { JackknifeChart, RollingChart } from '../time-charts';
import type { ReviewContext } from './types';

/** The break test in a sentence (with its caution when it rejects), or why it did not run. */
function BreakSentence({ b }: { b: BreakTestDto }) {
  if (b.status === 'undefined') return <p className="text-sm" data-testid="break-test">Break test: {b.reason}</p>;
  const significant = b.pValue !== null && b.pValue < 0.05;
  return (
    <p className={`text-sm ${significant ? 'notice-caution' : ''}`} data-testid="break-test">
      Break test: the largest likelihood-ratio statistic for separate (PD, ρ) before and after a split year is{' '}
      <span className="num">{fixed(b.statistic, 2)}</span>, with the second part starting in {b.splitYear}.{' '}
      {b.pValue === null ? (
        <>{b.reason}</>
      ) : significant ? (
        <>
          Its bootstrap p-value is <span className="num">{fixed(b.pValue, 3)}</span> ({b.replications - b.failed} panels simulated without a
          break): a significant break, so the window mixes regimes and one ρ for all of it describes neither part. Fit the parts
          separately, or say why the whole window is the right one.
        </>
      ) : (
        <>
          Its bootstrap p-value is <span className="num">{fixed(b.pValue, 3)}</span> ({b.replications - b.failed} panels simulated without a
          break): no significant break at 5%.
        </>
      )}
    </p>
  );
}

/** The jackknife's influence chart, its sentence and each estimator's jackknife bias and standard error. */
function JackknifePart({ j, full }: { j: JackknifeDto; full: number | null }) {
  if (j.status === 'undefined') return <p className="text-sm">Leave-one-year-out: {j.reason}</p>;
  const mle = j.estimators.binomialMle;
  const most = j.mostInfluential;
  const entries = mle ? mle.leaveOneOut.map((e) => ({ period: e.period, change: e.rho === null || full === null ? null : e.rho - full })) : [];
  return (
    <div className="space-y-2">
      {entries.length > 0 ? <JackknifeChart entries={entries} most={most?.period ?? null} /> : null}
      <p className="text-sm" data-testid="jackknife-sentence">
        {most
          ? `Leaving out ${most.period} moves the likelihood estimate most: ρ becomes ${rho((full ?? 0) + most.change)} (${signed(most.change)}).`
          : 'No year could be left out with an estimate left.'}
      </p>
      <ScrollBox label="Jackknife bias and standard error">
        <table className="table text-sm" data-testid="jackknife-table">
          <thead>
            <tr>
              <th>Estimator</th>
              <th className="text-right">Jackknife bias</th>
              <th className="text-right">Jackknife s.e.</th>
            </tr>
          </thead>
          <tbody>
            {Object.entries(j.estimators).map(([k, e]) => (
              <tr key={k}>
                <td>{estimatorLabel(k)}</td>
                <td className="num text-right">{e.bias === null ? '—' : signed(e.bias)}</td>
                <td className="num text-right">{e.se === null ? <span className="font-sans text-xs">{e.reason ?? '—'}</span> : rho(e.se)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollBox>
    </div>
  );
}

/** The rolling window's chart, or why there is none. */
function RollingPart({ r, full, lv }: { r: Stability['rolling']; full: number | null; lv: string }) {
  if (r.status === 'undefined') return <p className="text-sm">Rolling window: {r.reason}</p>;
  const values = r.entries.map((e) => e.rho).filter((x): x is number => x !== null);
  return (
    <div className="space-y-1">
      <RollingChart entries={r.entries} full={full} />
      <p className="text-sm" data-testid="rolling-sentence">
        The likelihood estimate on every window of {r.window} years with its {lv} profile interval
        {values.length > 0 ? `: from ${rho(Math.min(...values))} to ${rho(Math.max(...values))}` : ''}.
        {values.length < r.entries.length ? ` ${r.entries.length - values.length} window${r.entries.length - values.length === 1 ? ' has' : 's have'} no estimate (no default in it).` : ''}
      </p>
    </div>
  );
}

/**
 * Is rho stable across the window? The leave-one-year-out jackknife (which years drive the
 * estimate), the structural-break test and the rolling window (DESIGN.md `stability`).
 */
export function StabilitySection({ seg }: ReviewContext) {
  const st = seg.stability;
  if (!st) return <p className="text-sm text-[var(--color-muted)]">Not computed for this fit.</p>;
  const full = seg.estimates.binomialMle.rho;
  return (
    <div className="space-y-4">
      <BreakSentence b={st.breakTest} />
      <div className="grid gap-4 xl:grid-cols-2">
        <div>
          <h3 className="mb-1 text-base">Which years drive the estimate</h3>
          <JackknifePart j={st.jackknife} full={full} />
        </div>
        <div>
          <h3 className="mb-1 text-base">Rolling window</h3>
          <RollingPart r={st.rolling} full={full} lv={level(seg.level)} />
        </div>
      </div>
    </div>
  );
}
