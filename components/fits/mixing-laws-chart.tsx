import { pct } from '@/lib/format';
import { MIXING_LAW_LABELS, TAIL_RANGE, type TailCurve } from '@/lib/fits/mixing-laws-view';
import type { MixingLaw } from '@/lib/stats/copula-comparison';

/** Each law's line: colour and dash, so that the laws stay apart in print and for colour-blind readers. */
const STYLE: Readonly<Record<MixingLaw, { colour: string; dash?: string; width: number }>> = {
  gaussian: { colour: 'var(--color-ink)', width: 2.2 },
  t: { colour: 'var(--color-bad)', width: 2, dash: '7 4' },
  beta: { colour: 'var(--color-accent)', width: 1.8, dash: '2 3' },
  logitNormal: { colour: 'var(--color-caution)', width: 1.8, dash: '10 3 2 3' },
};

/** Round upper end of the rate axis. */
function rateMax(v: number): number {
  const steps = [0.005, 0.01, 0.02, 0.03, 0.05, 0.075, 0.1, 0.15, 0.2, 0.3, 0.4, 0.5, 0.6, 0.8, 1];
  return steps.find((s) => s >= v) ?? 1;
}

/**
 * The default-rate distributions of the fitted mixing laws on a logarithmic tail scale: for each law
 * the probability that a year's default rate (of an infinitely large pool) exceeds x, against x,
 * from 98% down to 1 in 10,000; the observed default rates as dots at their plotting positions
 * i / (T + 1) and as ticks on the rate axis.
 */
export function MixingLawsTailChart({ curves, observed }: { curves: readonly TailCurve[]; observed: readonly { rate: number; exceed: number }[] }) {
  const W = 640;
  const H = 300;
  const m = { l: 64, r: 150, t: 14, b: 42 };
  const drawn = curves.filter((c): c is Extract<TailCurve, { points: unknown[] }> => c.points !== null);
  const top = Math.max(...drawn.flatMap((c) => c.points.map((p) => p.rate)), ...observed.map((o) => o.rate), 1e-6);
  const xMax = rateMax(top * 1.02);
  const x = (v: number) => m.l + (Math.min(v, xMax) / xMax) * (W - m.l - m.r);
  const ly0 = 0; // 100% at the top
  const ly1 = Math.log10(TAIL_RANGE.to);
  const y = (e: number) => m.t + ((ly0 - Math.log10(Math.max(e, TAIL_RANGE.to))) / (ly0 - ly1)) * (H - m.t - m.b);
  const xTicks = [0, 0.25, 0.5, 0.75, 1].map((f) => f * xMax);
  const yTicks = [1, 0.1, 0.01, 0.001, 0.0001];
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      width="100%"
      role="img"
      aria-label="Probability that a year's default rate exceeds each level under every fitted mixing law, on a logarithmic scale, with the observed default rates marked"
      data-testid="mixing-laws-chart"
    >
      <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} fill="white" stroke="var(--color-line)" />
      {yTicks.map((t) => (
        <g key={t}>
          <line x1={m.l} x2={W - m.r} y1={y(t)} y2={y(t)} stroke="#efefea" />
          <text x={m.l - 4} y={y(t) + 3} fontSize={10} textAnchor="end" fill="var(--color-muted)">
            {t >= 0.01 ? pct(t, 1) : t === 0.001 ? '0.1%' : '0.01%'}
          </text>
        </g>
      ))}
      {xTicks.map((t) => (
        <text key={t} x={x(t)} y={H - m.b + 14} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
          {pct(t, 2)}
        </text>
      ))}
      <text x={(m.l + W - m.r) / 2} y={H - 6} fontSize={10} textAnchor="middle" fill="var(--color-muted)">
        default rate of the year x
      </text>
      <text x={12} y={(H - m.b + m.t) / 2} fontSize={10} textAnchor="middle" fill="var(--color-muted)" transform={`rotate(-90 12 ${(H - m.b + m.t) / 2})`}>
        P(default rate &gt; x), log scale
      </text>
      {drawn.map((c) => {
        const s = STYLE[c.law];
        const d = c.points.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(p.rate).toFixed(1)},${y(p.exceed).toFixed(1)}`).join(' ');
        return <path key={c.law} d={d} fill="none" stroke={s.colour} strokeWidth={s.width} strokeDasharray={s.dash} data-law={c.law} />;
      })}
      {observed.map((o, i) => (
        <g key={i}>
          <line x1={x(o.rate)} x2={x(o.rate)} y1={H - m.b} y2={H - m.b - 6} stroke="var(--color-ink)" />
          <circle cx={x(o.rate)} cy={y(o.exceed)} r={3.2} fill="white" stroke="var(--color-ink)" strokeWidth={1.3} />
        </g>
      ))}
      {curves.map((c, i) => {
        const s = STYLE[c.law];
        const ty = m.t + 12 + i * 30;
        return (
          <g key={c.law}>
            <line x1={W - m.r + 10} x2={W - m.r + 34} y1={ty} y2={ty} stroke={s.colour} strokeWidth={s.width} strokeDasharray={s.dash} />
            <text x={W - m.r + 38} y={ty + 3.5} fontSize={10} fill="var(--color-ink)">
              {MIXING_LAW_LABELS[c.law].replace(/ \(.*\)$/, '')}
            </text>
            {c.points === null ? (
              <text x={W - m.r + 38} y={ty + 15} fontSize={9} fill="var(--color-caution)">
                not drawn
              </text>
            ) : null}
          </g>
        );
      })}
      <g>
        <circle cx={W - m.r + 22} cy={m.t + 12 + curves.length * 30} r={3.2} fill="white" stroke="var(--color-ink)" strokeWidth={1.3} />
        <text x={W - m.r + 38} y={m.t + 15.5 + curves.length * 30} fontSize={10} fill="var(--color-ink)">
          observed years
        </text>
      </g>
    </svg>
  );
}
