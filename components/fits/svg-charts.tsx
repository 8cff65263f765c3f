import { rho } from '@/lib/format';
import { ESTIMATOR_ORDER, type EstimatorKey, type FitSegmentResult } from '@/lib/fits/results';
import { estimatorLabel } from '@/lib/stats/estimators/types';

/** Linear scale helper. */
function scale(d0: number, d1: number, r0: number, r1: number) {
  return (v: number) => r0 + ((v - d0) / (d1 - d0 || 1)) * (r1 - r0);
}

/** Round tick values: a step of 1, 2 or 5 times a power of ten giving at most `count` intervals. */
function niceTicks(max: number, count = 5): number[] {
  const raw = max / count;
  const pow = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * pow).find((s) => s >= raw * (1 - 1e-9)) ?? raw;
  const out: number[] = [];
  for (let t = 0; t <= max + 1e-12; t += step) out.push(Number(t.toFixed(10)));
  return out;
}

function tickLabel(t: number): string {
  return String(Number(t.toFixed(4)));
}

function niceMax(v: number): number {
  const steps = [0.05, 0.1, 0.15, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8, 1];
  return steps.find((s) => s >= v) ?? 1;
}

/** The interval an estimator other than binomialMle carries, with its name: chi-square, bootstrap or AR(1) profile. */
function ownInterval(seg: FitSegmentResult, k: EstimatorKey): { label: string; lower: number; upper: number } | null {
  const e = seg.estimates[k];
  if (!e || k === 'binomialMle' || !('intervals' in e) || !e.intervals) return null;
  const ivs = e.intervals as Record<string, { lower: number; upper: number } | null | undefined>;
  for (const [key, label] of [
    ['chiSquare', 'chi-square'],
    ['bootstrap', 'bootstrap'],
    ['profile', 'profile'],
  ] as const) {
    const iv = ivs[key];
    if (iv) return { label, lower: iv.lower, upper: iv.upper };
  }
  return null;
}

/**
 * Forest chart: each estimator's rho (those of the models the fit ran) with its interval: for the
 * likelihood estimate its three intervals stacked (profile, Wald on the logit scale, bootstrap
 * percentile when run), for the others the one each has (vasicekMle's chi-square, the moment
 * estimators' bootstrap when run, ar1Mle's profile); the chosen estimator highlighted, the
 * supervisory correlation as a dashed reference line.
 */
export function ForestChart({ seg, supervisory }: { seg: FitSegmentResult; supervisory: number | null }) {
  const keys = ESTIMATOR_ORDER.filter((k) => seg.estimates[k] !== undefined);
  const mle = seg.estimates.binomialMle;
  const iv = mle.intervals;
  const values = [
    ...keys.map((k) => Math.max(seg.estimates[k]!.rho ?? 0, ownInterval(seg, k)?.upper ?? 0)),
    iv.profile?.upper ?? 0,
    iv.wald?.upper ?? 0,
    iv.bootstrap?.upper ?? 0,
    supervisory ?? 0,
  ];
  const max = niceMax(Math.max(...values) * 1.05);
  const W = 660;
  const left = 300;
  const right = 60;
  const rowH = 32;
  const mleH = 62;
  const top = 10;
  const H = top + mleH + (keys.length - 1) * rowH + 34;
  const x = scale(0, max, left, W - right);
  const ticks = niceTicks(max);
  const rowTop = (i: number) => (i === 0 ? top : top + mleH + (i - 1) * rowH);
  const intervalLines: { key: string; label: string; level: number; lo: number; hi: number; width: number; colour: string }[] = [];
  if (iv.profile) intervalLines.push({ key: 'profile', label: 'profile', level: iv.profile.level, lo: iv.profile.lower, hi: iv.profile.upper, width: 3.5, colour: 'var(--color-accent)' });
  if (iv.wald) intervalLines.push({ key: 'wald', label: 'Wald', level: iv.wald.level, lo: iv.wald.lower, hi: iv.wald.upper, width: 2, colour: 'var(--color-ink)' });
  if (iv.bootstrap) intervalLines.push({ key: 'bootstrap', label: 'bootstrap', level: iv.bootstrap.level, lo: iv.bootstrap.lower, hi: iv.bootstrap.upper, width: 2, colour: 'var(--color-caution)' });
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Estimates of rho by estimator; profile, Wald and bootstrap intervals of the likelihood estimate" data-testid="forest-chart">
      {ticks.map((t) => (
        <g key={t}>
          <line x1={x(t)} x2={x(t)} y1={top} y2={H - 28} stroke="#efefea" />
          <text x={x(t)} y={H - 14} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
            {tickLabel(t)}
          </text>
        </g>
      ))}
      <text x={(left + W - right) / 2} y={H - 1} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        asset correlation ρ
      </text>
      {supervisory !== null ? (
        <g>
          <line x1={x(supervisory)} x2={x(supervisory)} y1={top} y2={H - 28} stroke="var(--color-caution)" strokeDasharray="4 3" />
          <text x={x(supervisory) + 3} y={H - 32} fontSize={10.5} fill="var(--color-caution)">
            supervisory {rho(supervisory)}
          </text>
        </g>
      ) : null}
      {keys.map((k, i) => {
        const e = seg.estimates[k]!;
        const own = ownInterval(seg, k);
        const isMle = k === 'binomialMle';
        const h = isMle ? mleH : rowH;
        // The likelihood row has the name on its own line and its intervals stacked below it.
        const nameY = rowTop(i) + (isMle ? 16 : rowH / 2 + 4);
        const y = isMle ? rowTop(i) + 30 : nameY;
        const chosen = k === seg.chosen;
        return (
          <g key={k}>
            {chosen ? <rect x={0} y={rowTop(i)} width={W} height={h} fill="var(--color-accent-soft)" /> : null}
            <text x={6} y={nameY + 4} fontSize={12.5} fontWeight={chosen ? 600 : 400} fill="var(--color-ink)">
              {estimatorLabel(k)}
              {chosen ? ' (chosen)' : ''}
            </text>
            {isMle
              ? intervalLines.map((l, j) => (
                  <g key={l.key}>
                    <line x1={x(l.lo)} x2={x(l.hi)} y1={y + j * 11} y2={y + j * 11} stroke={l.colour} strokeWidth={l.width} />
                    <text x={left - 8} y={y + j * 11 + 3.5} fontSize={10} textAnchor="end" fill={l.colour}>
                      {l.label} {Math.round(l.level * 100)}%
                    </text>
                  </g>
                ))
              : own ? (
                  <g>
                    <line x1={x(own.lower)} x2={x(own.upper)} y1={y} y2={y} stroke="var(--color-ink)" strokeWidth={1.5} />
                    <text x={x(own.lower)} y={y - 5} fontSize={9.5} fill="var(--color-muted)">
                      {own.label}
                    </text>
                  </g>
                ) : null}
            {e.rho !== null ? (
              <>
                <circle cx={x(e.rho)} cy={y} r={chosen ? 5.5 : 4} fill={chosen ? 'var(--color-accent)' : 'white'} stroke="var(--color-accent)" strokeWidth={1.5} />
                <text x={W - 6} y={y + 4} fontSize={12} textAnchor="end" className="num" fill="var(--color-ink)">
                  {rho(e.rho)}
                </text>
              </>
            ) : (
              <text x={left} y={y + 4} fontSize={11} fill="var(--color-bad)">
                {e.status === 'not-converged' ? 'did not converge' : 'undefined for these data'}
              </text>
            )}
          </g>
        );
      })}
    </svg>
  );
}

/** Profile log-likelihood of rho with the interval cut-off line and the interval ends. */
export function ProfileChart({ curve, cutoff, estimate, logLik, interval }: {
  curve: { rho: number; logLik: number }[];
  cutoff: number;
  estimate: number;
  logLik: number;
  interval: { lower: number; upper: number; level: number; upperAtSearchLimit: boolean } | null;
}) {
  const W = 460;
  const H = 230;
  const m = { l: 56, r: 12, t: 12, b: 36 };
  const xs = curve.map((p) => p.rho);
  // Show the curve down to well below the cut-off; lower parts run off the bottom of the plot (clipped, not flattened).
  const floor = logLik - Math.max(6, (logLik - cutoff) * 3);
  const x = scale(0, Math.max(...xs), m.l, W - m.r);
  const y = scale(floor, logLik + 0.3, H - m.b, m.t);
  const path = curve.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(p.rho).toFixed(1)},${y(p.logLik).toFixed(1)}`).join(' ');
  const xt = niceTicks(Math.max(...xs), 5);
  const clipId = `profile-clip-${Math.round(estimate * 1e6)}-${Math.round(-logLik * 100)}`;
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Profile log-likelihood of rho with the interval cut-off" data-testid="profile-chart">
      <defs>
        <clipPath id={clipId}>
          <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} />
        </clipPath>
      </defs>
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} fill="white" stroke="var(--color-line)" />
      {xt.map((t) => (
        <text key={t} x={x(t)} y={H - m.b + 14} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
          {tickLabel(t)}
        </text>
      ))}
      <text x={(m.l + W - m.r) / 2} y={H - 4} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        ρ (p re-maximised at each ρ)
      </text>
      <text x={12} y={H / 2} fontSize={10} textAnchor="middle" fill="var(--color-muted)" transform={`rotate(-90 12 ${H / 2})`}>
        profile log-likelihood
      </text>
      <text x={m.l - 4} y={y(logLik) + 3} fontSize={9.5} textAnchor="end" fill="var(--color-muted)">
        {logLik.toFixed(1)}
      </text>
      <text x={m.l - 4} y={y(cutoff) + 3} fontSize={9.5} textAnchor="end" fill="var(--color-bad)">
        {cutoff.toFixed(1)}
      </text>
      {interval ? <rect x={x(interval.lower)} y={m.t} width={x(interval.upper) - x(interval.lower)} height={H - m.t - m.b} fill="var(--color-accent-soft)" /> : null}
      <line x1={m.l} x2={W - m.r} y1={y(cutoff)} y2={y(cutoff)} stroke="var(--color-bad)" strokeDasharray="5 4" />
      <path d={path} fill="none" stroke="var(--color-accent)" strokeWidth={2} clipPath={`url(#${clipId})`} />
      <line x1={x(estimate)} x2={x(estimate)} y1={m.t} y2={H - m.b} stroke="var(--color-accent)" strokeOpacity={0.6} />
      <text x={x(estimate) + 4} y={H - m.b - 6} fontSize={10} fill="var(--color-accent)">
        ρ̂ {rho(estimate)}
      </text>
    </svg>
  );
}

/**
 * Implied factor x_t by period (bars; negative = a bad year) and, in a strip below, the
 * probability-integral-transform value of each period's default rate (dots on 0-1).
 */
export function FactorChart({ periods, factor, pit }: { periods: string[]; factor: (number | null)[]; pit: number[] | null }) {
  const W = 480;
  const m = { l: 58, r: 10, t: 22, b: 38 };
  const barH = 140;
  const gap = 34;
  const pitH = pit ? 56 : 0;
  const H = m.t + barH + (pit ? gap + pitH : 0) + m.b;
  const lim = Math.max(3, ...factor.map((f) => Math.abs(f ?? 0)));
  const bw = (W - m.l - m.r) / periods.length;
  const y = scale(-lim, lim, m.t + barH, m.t);
  const pitTop = m.t + barH + gap;
  const py = scale(0, 1, pitTop + pitH, pitTop);
  const cx = (i: number) => m.l + i * bw + bw / 2;
  const yLabel = (x: number, yMid: number, text: string) => (
    <text x={x} y={yMid} fontSize={10} textAnchor="middle" fill="var(--color-muted)" transform={`rotate(-90 ${x} ${yMid})`}>
      {text}
    </text>
  );
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      width="100%"
      role="img"
      aria-label="Implied systematic factor by year (standard deviations; below 0 a worse year than average) and the probability integral transform of each year's default count (0 to 1)"
      data-testid="factor-chart"
    >
      <text x={m.l} y={12} fontSize={10.5} fill="var(--color-ink)">
        Implied factor xₜ by year (red: a worse year than average)
      </text>
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={barH} fill="white" stroke="var(--color-line)" />
      {yLabel(14, m.t + barH / 2, 'xₜ (standard deviations)')}
      {[-2, 0, 2].map((t) => (
        <g key={t}>
          <line x1={m.l} x2={W - m.r} y1={y(t)} y2={y(t)} stroke={t === 0 ? 'var(--color-muted)' : '#efefea'} />
          <text x={m.l - 4} y={y(t) + 3} fontSize={10} textAnchor="end" fill="var(--color-muted)">
            {t}
          </text>
        </g>
      ))}
      {factor.map((f, i) =>
        f === null ? (
          <text key={periods[i]} x={cx(i)} y={y(0) - 4} fontSize={9} textAnchor="middle" fill="var(--color-caution)">
            n/a
          </text>
        ) : (
          <rect key={periods[i]} x={cx(i) - bw * 0.3} width={bw * 0.6} y={Math.min(y(0), y(f))} height={Math.abs(y(f) - y(0))} fill={f < 0 ? 'var(--color-bad)' : 'var(--color-accent)'} fillOpacity={0.7} />
        ),
      )}
      {pit ? (
        <g>
          <text x={m.l} y={pitTop - 8} fontSize={10.5} fill="var(--color-ink)">
            Probability integral transform (PIT) by year; shaded: the outer tenths
          </text>
          <rect x={m.l} y={pitTop} width={W - m.l - m.r} height={pitH} fill="white" stroke="var(--color-line)" />
          <rect x={m.l} y={py(1)} width={W - m.l - m.r} height={py(0.9) - py(1)} fill="var(--color-caution-soft)" />
          <rect x={m.l} y={py(0.1)} width={W - m.l - m.r} height={py(0) - py(0.1)} fill="var(--color-caution-soft)" />
          {yLabel(14, pitTop + pitH / 2, 'PIT (0–1)')}
          {[0, 0.5, 1].map((t) => (
            <text key={t} x={m.l - 4} y={py(t) + 3} fontSize={10} textAnchor="end" fill="var(--color-muted)">
              {t}
            </text>
          ))}
          {pit.map((u, i) => (
            <circle key={periods[i]} cx={cx(i)} cy={py(u)} r={3} fill="var(--color-ink)" />
          ))}
        </g>
      ) : null}
      {periods.map((p, i) =>
        i % Math.ceil(periods.length / 12) === 0 ? (
          <text key={p} x={cx(i)} y={H - 22} fontSize={9.5} textAnchor="middle" fill="var(--color-muted)">
            {p}
          </text>
        ) : null,
      )}
      <text x={(m.l + W - m.r) / 2} y={H - 6} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        year
      </text>
    </svg>
  );
}
