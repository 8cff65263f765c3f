/**
 * The portfolio sections of a fit's review: grades under one factor, the factor-correlation
 * matrix as a heat map (values in the cells, the nearest correlation matrix beside it, CSV), and a
 * segment's low-default posterior with its prior drawn beside it. Server components: they only
 * draw the stored results (lib/fits/results.ts).
 */
import { MatrixDraftForm } from '@/components/factor-matrices/matrix-draft-form';
import { toCsv } from '@/lib/csv';
import { Heatmap } from './correlation-heatmap';
import type { FactorCorrelationMatrix } from '@/lib/stats/factor-correlation-matrix';
import type { GradeAuditSummary } from '@/lib/stats/grade-audit';
import type { GradeFit } from '@/lib/stats/grade-fit';
import type { PosteriorBlock, PrudentPdBlock } from '@/lib/stats/low-default';

const pct = (v: number | null | undefined, digits = 3) => (v === null || v === undefined ? '–' : `${(100 * v).toFixed(digits)}%`);
const num = (v: number | null | undefined, digits = 3) => (v === null || v === undefined ? '–' : v.toFixed(digits));

/** Grades under one factor: common rho, grade PDs, own rho, each grade alone, LR test, order warning. */
export function GroupResults({ group }: { group: GradeFit & { estimatorAudit?: GradeAuditSummary | null } }) {
  const c = group.commonRho;
  return (
    <section className="panel space-y-3 p-4" aria-labelledby="group-title" data-testid="group-results">
      <h2 id="group-title">Grades under one factor: {group.segments.join(', ')}</h2>
      {group.status !== 'ok' && group.status !== 'clipped' ? (
        <p className="notice-caution text-sm">{group.reason}</p>
      ) : null}
      {c ? (
        <>
          <p className="text-sm">
            Common asset correlation <strong>{num(c.rho, 4)}</strong>, {Math.round(100 * c.interval.level)}% profile interval [{num(c.interval.lower, 4)},{' '}
            {num(c.interval.upper, 4)}]{c.interval.upperAtSearchLimit ? ' (upper end at the search limit)' : ''}, over {group.periods[0]}–{group.periods.at(-1)}.
          </p>
          {group.monotonicity && !group.monotonicity.increasing ? (
            <p className="notice-caution text-sm" data-testid="grade-order-warning">
              The fitted PDs do not increase in the order given:{' '}
              {group.monotonicity.breaks.map((b) => `${b.to} (${pct(b.pdTo)}) is below ${b.from} (${pct(b.pdFrom)})`).join('; ')}.
            </p>
          ) : null}
          <div className="overflow-x-auto">
            <table className="table text-sm">
              <caption className="sr-only">Grade PDs with their intervals under the common correlation, and each grade fitted alone</caption>
              <thead>
                <tr>
                  <th scope="col">grade</th>
                  <th scope="col">PD (common rho)</th>
                  <th scope="col">interval</th>
                  <th scope="col">own rho, same factor</th>
                  <th scope="col">alone: rho</th>
                  <th scope="col">alone: PD</th>
                </tr>
              </thead>
              <tbody>
                {group.segments.map((s) => (
                  <tr key={s}>
                    <th scope="row">{s}</th>
                    <td>{pct(group.pds?.[s]?.pd)}</td>
                    <td>
                      [{pct(group.pds?.[s]?.lower)}, {pct(group.pds?.[s]?.upper)}]
                    </td>
                    <td>{num(group.gradeRho?.[s], 4)}</td>
                    <td>{num(group.single[s]?.rho, 4)}</td>
                    <td>{pct(group.single[s]?.pd)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {group.lrTest ? (
            <p className="text-sm">
              Likelihood-ratio test of one common rho against a rho per grade: statistic {num(group.lrTest.statistic)}, {group.lrTest.df} degrees of freedom,
              p-value {num(group.lrTest.pValue)}{' '}
              {group.lrTest.pValue < 0.05 ? '(the grades’ correlations differ more than chance explains)' : '(no evidence against one common rho)'}.
            </p>
          ) : null}
          {group.estimatorAudit ? (
            <p className="text-sm">
              At these cohort sizes and years ({group.estimatorAudit.replications} simulated groups), the common rho has bias {num(group.estimatorAudit.bias, 4)} and
              its interval covered the truth in {pct(group.estimatorAudit.coverage, 1)} of them.
            </p>
          ) : null}
          {group.warnings.filter((w) => w.code !== 'grade-order').map((w) => (
            <p key={w.code} className="notice-caution text-sm">
              {w.message}
            </p>
          ))}
        </>
      ) : null}
    </section>
  );
}

/** The factor-correlation matrix with intervals, the nearest valid matrix beside it, and a CSV. */
export function PairMatrix({ pairs, fitId, mayDraft = false, today }: { pairs: FactorCorrelationMatrix; fitId: number; mayDraft?: boolean; today: string }) {
  const csv = toCsv(
    ['segment_a', 'segment_b', 'r', 'lower', 'upper', 'level', 'moment', 'status', 'nearest', 'joint_default', 'default_correlation'],
    pairs.entries.map((e) => {
      const i = pairs.segments.indexOf(e.a);
      const j = pairs.segments.indexOf(e.b);
      return [e.a, e.b, e.r, e.lower, e.upper, e.level, e.moment, e.status, pairs.nearest ? pairs.nearest[i][j] : e.r, e.obligors?.jointDefault ?? null, e.obligors?.defaultCorrelation ?? null];
    }),
    { comments: [`Factor correlations between segments, fit ${fitId}`] },
  );
  return (
    <section className="panel space-y-3 p-4" aria-labelledby="pairs-title" data-testid="pair-matrix">
      <h2 id="pairs-title">Correlations between the segments&apos; factors</h2>
      <p className="text-sm text-[var(--color-muted)]">
        Each segment&apos;s PD and rho are its own likelihood estimates on the pair&apos;s common years; r is then estimated by maximum likelihood. Red:
        the factors move together; blue: against each other.
      </p>
      <div className="flex flex-wrap gap-6 overflow-x-auto">
        <Heatmap title="Pairwise estimates" segments={pairs.segments} matrix={pairs.matrix} testId="pair-heatmap" />
        {pairs.nearest ? <Heatmap title="Nearest correlation matrix (Higham 2002)" segments={pairs.segments} matrix={pairs.nearest} testId="pair-nearest" /> : null}
      </div>
      <p className="text-sm">{pairs.nearestNote}</p>
      <div className="overflow-x-auto">
        <table className="table text-sm">
          <caption className="sr-only">Each pair: factor correlation with its interval, the moment version, and two obligors&apos; joint default</caption>
          <thead>
            <tr>
              <th scope="col">pair</th>
              <th scope="col">r</th>
              <th scope="col">interval</th>
              <th scope="col">moment version</th>
              <th scope="col">joint default of two obligors</th>
              <th scope="col">default correlation</th>
              <th scope="col" />
            </tr>
          </thead>
          <tbody>
            {pairs.entries.map((e) => (
              <tr key={`${e.a}|${e.b}`}>
                <th scope="row">
                  {e.a} – {e.b}
                </th>
                <td>{e.r === null ? '–' : num(e.r)}</td>
                <td>{e.r === null ? e.reason : `[${num(e.lower)}, ${num(e.upper)}]`}</td>
                <td>{num(e.moment)}</td>
                <td>{pct(e.obligors?.jointDefault, 4)}</td>
                <td>{num(e.obligors?.defaultCorrelation, 4)}</td>
                <td>
                  {e.obligors && e.margins.a && e.margins.b ? (
                    <a
                      className="text-xs"
                      href={`/pairs?pdA=${e.margins.a.pd}&pdB=${e.margins.b.pd}&rho=${Math.max(0, e.obligors.assetCorrelation)}`}
                    >
                      explore
                    </a>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <a className="btn btn-quiet text-sm" download={`fit-${fitId}-factor-correlations.csv`} href={`data:text/csv;charset=utf-8,${encodeURIComponent(csv)}`}>
        Download as CSV
      </a>
      {mayDraft ? <MatrixDraftForm fitId={fitId} today={today} complete={pairs.entries.every((e) => e.r !== null && e.lower !== null && e.upper !== null)} psd={pairs.nearest === null} /> : null}
    </section>
  );
}

function DensityChart({ density }: { density: { rho: number; posterior: number; prior: number }[] }) {
  const W = 420;
  const H = 140;
  const top = Math.max(...density.map((d) => Math.max(d.posterior, Math.min(d.prior, 3 * d.posterior + 1))));
  const x = (r: number) => 30 + (W - 40) * r;
  const y = (v: number) => H - 20 - (H - 30) * Math.min(1, v / top);
  const path = (key: 'posterior' | 'prior') => density.map((d, i) => `${i === 0 ? 'M' : 'L'}${x(d.rho).toFixed(1)},${y(d[key]).toFixed(1)}`).join(' ');
  return (
    <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label="Posterior density of rho (solid) and prior density (dashed)" className="w-full max-w-xl">
      <line x1={30} x2={W - 10} y1={H - 20} y2={H - 20} stroke="currentColor" strokeOpacity={0.4} />
      {[0, 0.25, 0.5, 0.75, 1].map((t) => (
        <text key={t} x={x(t)} y={H - 5} fontSize={10} textAnchor="middle" fill="currentColor">
          {t}
        </text>
      ))}
      <path d={path('prior')} fill="none" stroke="currentColor" strokeOpacity={0.5} strokeDasharray="4 3" />
      <path d={path('posterior')} fill="none" stroke="var(--color-accent, #b4442c)" strokeWidth={2} />
    </svg>
  );
}

/**
 * A segment's posterior of rho (and p) with the prior drawn beside it, and its most prudent PD.
 * `leads` when the segment has fewer defaults than `setting` (LOW_DEFAULT_THRESHOLD, lib/env.ts):
 * the review then says the likelihood estimate is not informative. Either way it names the setting.
 */
export function PosteriorSection({ posterior, prudentPd, totalDefaults, setting }: {
  posterior?: PosteriorBlock;
  prudentPd?: PrudentPdBlock;
  totalDefaults: number;
  setting: number;
}) {
  const leads = totalDefaults < setting;
  if (!posterior && !prudentPd) return null;
  return (
    <div className="space-y-2" data-testid="posterior-section">
      {leads ? (
        <p className="notice-caution text-sm" data-testid="low-default-notice">
          With {totalDefaults} default{totalDefaults === 1 ? '' : 's'} in total (fewer than {setting}, the setting LOW_DEFAULT_THRESHOLD), the likelihood estimate is not informative: read the
          posterior, and its dependence on the prior, first.
        </p>
      ) : (
        <p className="text-sm text-[var(--color-muted)]" data-testid="low-default-setting">
          With {totalDefaults} defaults in total the likelihood estimate leads; below {setting} (the setting LOW_DEFAULT_THRESHOLD) the posterior would.
        </p>
      )}
      {posterior?.status === 'ok' ? (
        <>
          <p className="text-sm">
            Prior {posterior.prior.rho} on rho, {posterior.prior.pd} on p: median <strong>{num(posterior.median, 4)}</strong>, mean {num(posterior.mean, 4)},{' '}
            {Math.round(100 * posterior.level)}% equal-tailed [{num(posterior.lower, 4)}, {num(posterior.upper, 4)}], highest-density [{num(posterior.hpdLower, 4)},{' '}
            {num(posterior.hpdUpper, 4)}]. PD: median {pct(posterior.pd.median)}, [{pct(posterior.pd.lower)}, {pct(posterior.pd.upper)}].
          </p>
          <p className="text-sm">{posterior.influence}</p>
          <DensityChart density={posterior.density} />
          <p className="text-xs text-[var(--color-muted)]">Solid: posterior density of rho; dashed: the prior on rho.</p>
        </>
      ) : posterior ? (
        <p className="notice-caution text-sm">The posterior was not computed: {posterior.reason}</p>
      ) : null}
      {prudentPd ? (
        <p className="text-sm" data-testid="prudent-pd">
          {prudentPd.status === 'undefined'
            ? `Most prudent PD not computed: ${prudentPd.reason}`
            : `Most prudent PD (Pluto & Tasche) at rho ${num(prudentPd.rho, 4)} and ${Math.round(100 * prudentPd.confidence)}% confidence: ${pct(prudentPd.upper)} — an aid beside the PD an assumption uses, not a replacement for it.`}
        </p>
      ) : null}
    </div>
  );
}
