import { fixed, rho } from '@/lib/format';

/** Linear scale helper. */
function scale(d0: number, d1: number, r0: number, r1: number) {
  return (v: number) => r0 + ((v - d0) / (d1 - d0 || 1)) * (r1 - r0);
}

/** Round ticks from 0 to max: a step of 1, 2 or 5 times a power of ten, at most `count` intervals. */
function ticks(max: number, count = 4): number[] {
  const raw = max / count;
  const pow = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * pow).find((s) => s >= raw * (1 - 1e-9)) ?? raw;
  const out: number[] = [];
  for (let t = 0; t <= max + 1e-12; t += step) out.push(Number(t.toFixed(10)));
  return out;
}

/** Year labels under a chart: at most about 12, evenly spaced. */
function yearLabels(labels: string[], x: (i: number) => number, y: number) {
  const every = Math.ceil(labels.length / 12);
  return labels.map((p, i) =>
    i % every === 0 ? (
      <text key={p} x={x(i)} y={y} fontSize={9.5} textAnchor="middle" fill="var(--color-muted)">
        {p}
      </text>
    ) : null,
  );
}

/**
 * The profile log-likelihood of phi (p and rho re-maximised at each phi) with the cut-off of the
 * interval, the interval shaded and phi = 0 (independent years) marked.
 */
export function PhiProfileChart({
  points,
  cutoff,
  estimate,
  interval,
}: {
  points: { phi: number; logLik: number }[];
  cutoff: number;
  estimate: number | null;
  interval: { lower: number; upper: number } | null;
}) {
  const W = 460;
  const H = 220;
  const m = { l: 56, r: 12, t: 12, b: 36 };
  const top = Math.max(...points.map((p) => p.logLik));
  const floor = top - Math.max(6, (top - cutoff) * 3);
  const x = scale(-1, 1, m.l, W - m.r);
  const y = scale(floor, top + 0.3, H - m.b, m.t);
  // lower parts run off the bottom of the plot (clipped, not flattened)
  const path = points.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(p.phi).toFixed(1)},${y(p.logLik).toFixed(1)}`).join(' ');
  const clipId = `phi-clip-${Math.round(-top * 100)}`;
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Profile log-likelihood of phi, the persistence of the factor, with the interval cut-off" data-testid="phi-profile-chart">
      <defs>
        <clipPath id={clipId}>
          <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} />
        </clipPath>
      </defs>
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} fill="white" stroke="var(--color-line)" />
      {interval ? <rect x={x(interval.lower)} y={m.t} width={x(interval.upper) - x(interval.lower)} height={H - m.t - m.b} fill="var(--color-accent-soft)" /> : null}
      {[-1, -0.5, 0, 0.5, 1].map((t) => (
        <text key={t} x={x(t)} y={H - m.b + 14} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
          {t}
        </text>
      ))}
      <text x={(m.l + W - m.r) / 2} y={H - 4} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        φ, the year-to-year persistence of the factor (p and ρ re-maximised at each φ)
      </text>
      <text x={12} y={H / 2} fontSize={10} textAnchor="middle" fill="var(--color-muted)" transform={`rotate(-90 12 ${H / 2})`}>
        profile log-likelihood
      </text>
      <text x={m.l - 4} y={y(cutoff) + 3} fontSize={9.5} textAnchor="end" fill="var(--color-bad)">
        {cutoff.toFixed(1)}
      </text>
      <line x1={m.l} x2={W - m.r} y1={y(cutoff)} y2={y(cutoff)} stroke="var(--color-bad)" strokeDasharray="5 4" />
      <line x1={x(0)} x2={x(0)} y1={m.t} y2={H - m.b} stroke="var(--color-muted)" strokeDasharray="2 3" />
      <text x={x(0) + 3} y={m.t + 10} fontSize={9.5} fill="var(--color-muted)">
        independent years
      </text>
      <path d={path} fill="none" stroke="var(--color-accent)" strokeWidth={2} clipPath={`url(#${clipId})`} />
      {estimate !== null ? (
        <>
          <line x1={x(estimate)} x2={x(estimate)} y1={m.t} y2={H - m.b} stroke="var(--color-accent)" strokeOpacity={0.6} />
          <text x={x(estimate) + 4} y={H - m.b - 6} fontSize={10} fill="var(--color-accent)">
            φ̂ {fixed(estimate, 2)}
          </text>
        </>
      ) : null}
    </svg>
  );
}

/**
 * The influence of each year: the change in rho when that year is left out (bars, up: rho rises
 * without it), the most influential year marked.
 */
export function JackknifeChart({ entries, most }: { entries: { period: string; change: number | null }[]; most: string | null }) {
  const W = 460;
  const H = 200;
  const m = { l: 52, r: 10, t: 14, b: 26 };
  const lim = Math.max(1e-4, ...entries.map((e) => Math.abs(e.change ?? 0))) * 1.1;
  const bw = (W - m.l - m.r) / entries.length;
  const cx = (i: number) => m.l + i * bw + bw / 2;
  const y = scale(-lim, lim, H - m.b, m.t);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Change in the estimate of rho when each year is left out" data-testid="jackknife-chart">
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} fill="white" stroke="var(--color-line)" />
      {[-lim / 1.1, 0, lim / 1.1].map((t) => (
        <g key={t}>
          <line x1={m.l} x2={W - m.r} y1={y(t)} y2={y(t)} stroke={t === 0 ? 'var(--color-muted)' : '#efefea'} />
          <text x={m.l - 4} y={y(t) + 3} fontSize={9.5} textAnchor="end" fill="var(--color-muted)">
            {t === 0 ? '0' : `${t > 0 ? '+' : '−'}${Math.abs(t).toFixed(3)}`}
          </text>
        </g>
      ))}
      <text x={12} y={H / 2} fontSize={10} textAnchor="middle" fill="var(--color-muted)" transform={`rotate(-90 12 ${H / 2})`}>
        change in ρ without the year
      </text>
      {entries.map((e, i) =>
        e.change === null ? (
          <text key={e.period} x={cx(i)} y={y(0) - 4} fontSize={9} textAnchor="middle" fill="var(--color-caution)">
            n/a
          </text>
        ) : (
          <rect
            key={e.period}
            x={cx(i) - bw * 0.3}
            width={bw * 0.6}
            y={Math.min(y(0), y(e.change))}
            height={Math.max(0.5, Math.abs(y(e.change) - y(0)))}
            fill={e.period === most ? 'var(--color-caution)' : 'var(--color-accent)'}
            fillOpacity={0.75}
          >
            <title>{`${e.period}: ${e.change >= 0 ? '+' : '−'}${rho(Math.abs(e.change))}`}</title>
          </rect>
        ),
      )}
      {yearLabels(
        entries.map((e) => e.period),
        cx,
        H - 8,
      )}
    </svg>
  );
}

/** Rolling-window estimates of rho: each window's estimate (dot) and interval (bar), at the window's last year. */
export function RollingChart({ entries, full }: { entries: { from: string; to: string; rho: number | null; lower: number | null; upper: number | null }[]; full: number | null }) {
  const W = 460;
  const H = 210;
  const m = { l: 48, r: 10, t: 12, b: 36 };
  const top = Math.max(0.05, ...entries.map((e) => e.upper ?? e.rho ?? 0), full ?? 0) * 1.05;
  const yt = ticks(top);
  const max = yt[yt.length - 1] >= top ? yt[yt.length - 1] : top;
  const bw = (W - m.l - m.r) / entries.length;
  const cx = (i: number) => m.l + i * bw + bw / 2;
  const y = scale(0, max, H - m.b, m.t);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label="Estimate of rho and its interval on each rolling window" data-testid="rolling-chart">
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} fill="white" stroke="var(--color-line)" />
      {yt.map((t) => (
        <g key={t}>
          <line x1={m.l} x2={W - m.r} y1={y(t)} y2={y(t)} stroke="#efefea" />
          <text x={m.l - 4} y={y(t) + 3} fontSize={9.5} textAnchor="end" fill="var(--color-muted)">
            {t}
          </text>
        </g>
      ))}
      {full !== null ? (
        <g>
          <line x1={m.l} x2={W - m.r} y1={y(full)} y2={y(full)} stroke="var(--color-accent)" strokeDasharray="4 3" />
          <text x={W - m.r - 4} y={y(full) - 4} fontSize={9.5} textAnchor="end" fill="var(--color-accent)">
            whole window {rho(full)}
          </text>
        </g>
      ) : null}
      {entries.map((e, i) => (
        <g key={e.to}>
          {e.lower !== null && e.upper !== null ? (
            <line x1={cx(i)} x2={cx(i)} y1={y(e.lower)} y2={y(Math.min(e.upper, max))} stroke="var(--color-ink)" strokeWidth={1.5} />
          ) : null}
          {e.rho !== null ? (
            <circle cx={cx(i)} cy={y(e.rho)} r={3.2} fill="var(--color-accent)">
              <title>{`${e.from}–${e.to}: ρ ${rho(e.rho)}`}</title>
            </circle>
          ) : (
            <text x={cx(i)} y={y(0) - 4} fontSize={9} textAnchor="middle" fill="var(--color-caution)">
              n/a
            </text>
          )}
        </g>
      ))}
      {yearLabels(
        entries.map((e) => e.to),
        cx,
        H - m.b + 14,
      )}
      <text x={(m.l + W - m.r) / 2} y={H - 4} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        last year of the window
      </text>
    </svg>
  );
}
