import { useId } from 'react';
import { densityContour } from '@/lib/fits/pair';
import { bivariateTContour } from '@/lib/stats/bivariate-t-density';

const SIZE = 340;
const PAD = { left: 44, right: 12, top: 12, bottom: 40 };
const CONTOURS = [0.99, 0.95, 0.8, 0.5, 0.2] as const;

/**
 * The standard bivariate normal density of two obligors' asset values drawn as shaded contours
 * (exact ellipses, each enclosing the probability written on it), with the joint-default corner
 * x < k1, y < k2 marked; with `nu` the standard bivariate t density of the t copula's latent pair
 * instead (its level sets are ellipses too, wider at the same probability). `limit` is the half
 * width of the axes (two figures meant to be compared share it). Pure SVG: re-renders at once when
 * rho or a threshold moves.
 */
export function PairDensity({
  rho,
  k1,
  k2,
  jointLabel,
  nu,
  limit = 4,
}: {
  rho: number;
  k1: number;
  k2: number;
  jointLabel: string;
  nu?: number;
  limit?: number;
}) {
  const LIM = limit;
  const uid = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const law = nu === undefined ? 'standard normal' : `Student t, ν = ${Number(nu.toPrecision(4))}`;
  const inner = SIZE - PAD.left - PAD.right;
  const innerH = SIZE - PAD.top - PAD.bottom;
  const sx = (x: number) => PAD.left + ((x + LIM) / (2 * LIM)) * inner;
  const sy = (y: number) => PAD.top + ((LIM - y) / (2 * LIM)) * innerH;
  const unit = inner / (2 * LIM);
  const cx1 = sx(Math.max(-LIM, Math.min(LIM, k1)));
  const cy2 = sy(Math.max(-LIM, Math.min(LIM, k2)));
  const step = LIM > 4 ? 2 : 1;
  const ticks = Array.from({ length: (2 * LIM) / step + 1 }, (_, i) => -LIM + i * step);
  const rhoDraw = Math.min(rho, 0.999);
  const outside = k1 < -LIM || k2 < -LIM;
  return (
    <figure className="m-0">
      <svg
        viewBox={`0 0 ${SIZE} ${SIZE}`}
        width="100%"
        style={{ maxWidth: SIZE }}
        role="img"
        aria-label={`${nu === undefined ? 'Bivariate normal' : `Bivariate Student t (ν = ${Number(nu.toPrecision(4))})`} density of the two asset values at correlation ${rho.toFixed(3)}; the joint-default corner below ${k1.toFixed(2)} and ${k2.toFixed(2)} holds probability ${jointLabel}.`}
        data-testid={nu === undefined ? 'pair-density' : 'pair-density-t'}
      >
        <defs>
          <clipPath id={`${uid}-area`}>
            <rect x={PAD.left} y={PAD.top} width={inner} height={innerH} />
          </clipPath>
          <pattern id={`${uid}-hatch`} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <line x1="0" y1="0" x2="0" y2="6" stroke="var(--color-bad)" strokeWidth="1.2" strokeOpacity="0.45" />
          </pattern>
        </defs>
        <rect x={PAD.left} y={PAD.top} width={inner} height={innerH} fill="white" stroke="var(--color-line)" />
        <g clipPath={`url(#${uid}-area)`}>
          {ticks.map((t) => (
            <g key={t} stroke="#efefea">
              <line x1={sx(t)} x2={sx(t)} y1={PAD.top} y2={PAD.top + innerH} />
              <line x1={PAD.left} x2={PAD.left + inner} y1={sy(t)} y2={sy(t)} />
            </g>
          ))}
          {CONTOURS.map((q, i) => {
            const e = nu === undefined ? densityContour(rhoDraw, q) : bivariateTContour(rhoDraw, nu, q);
            return (
              <ellipse
                key={q}
                cx={sx(0)}
                cy={sy(0)}
                rx={e.alongDiagonal * unit}
                ry={e.acrossDiagonal * unit}
                transform={`rotate(-45 ${sx(0)} ${sy(0)})`}
                fill="var(--color-accent)"
                fillOpacity={0.08 + i * 0.07}
                stroke="var(--color-accent)"
                strokeOpacity={0.55}
                strokeWidth={0.8}
              />
            );
          })}
          <rect x={PAD.left} y={cy2} width={Math.max(0, cx1 - PAD.left)} height={Math.max(0, PAD.top + innerH - cy2)} fill={`url(#${uid}-hatch)`} />
          <rect
            x={PAD.left}
            y={cy2}
            width={Math.max(0, cx1 - PAD.left)}
            height={Math.max(0, PAD.top + innerH - cy2)}
            fill="var(--color-bad)"
            fillOpacity={0.12}
            stroke="var(--color-bad)"
            strokeWidth={1.2}
          />
          <line x1={cx1} x2={cx1} y1={PAD.top} y2={PAD.top + innerH} stroke="var(--color-bad)" strokeDasharray="4 3" />
          <line x1={PAD.left} x2={PAD.left + inner} y1={cy2} y2={cy2} stroke="var(--color-bad)" strokeDasharray="4 3" />
        </g>
        <text x={Math.min(cx1, PAD.left + inner) + 4} y={PAD.top + 12} fontSize="10" fill="var(--color-bad)">
          A defaults to the left
        </text>
        <text x={PAD.left + inner - 4} y={Math.max(cy2, PAD.top) - 4} fontSize="10" fill="var(--color-bad)" textAnchor="end">
          B defaults below
        </text>
        <text x={PAD.left + 4} y={PAD.top + innerH - 6} fontSize="11" fontWeight="600" fill="var(--color-bad)">
          both: {jointLabel}
        </text>
        {ticks.map((t) => (
          <g key={t} fontSize="10" fill="var(--color-muted)">
            <text x={sx(t)} y={PAD.top + innerH + 13} textAnchor="middle">
              {t}
            </text>
            <text x={PAD.left - 6} y={sy(t) + 3} textAnchor="end">
              {t}
            </text>
          </g>
        ))}
        <text x={PAD.left + inner / 2} y={SIZE - 6} fontSize="11" textAnchor="middle" fill="var(--color-ink)">
          asset value of A ({law})
        </text>
        <text
          x={12}
          y={PAD.top + innerH / 2}
          fontSize="11"
          textAnchor="middle"
          fill="var(--color-ink)"
          transform={`rotate(-90 12 ${PAD.top + innerH / 2})`}
        >
          asset value of B
        </text>
      </svg>
      <figcaption className="mt-1 text-xs text-[var(--color-muted)]">
        Shaded ellipses enclose 20%, 50%, 80%, 95% and 99% of the probability. The hatched corner is where both
        obligors default.{nu === undefined ? '' : ' The t’s asset values spread wider (variance ν / (ν − 2)) and its tails are heavier, so its ellipses and thresholds lie farther out: compare the probabilities, not the areas.'}
        {outside ? ` A threshold lies below −${LIM} and is drawn at the edge.` : ''}
      </figcaption>
    </figure>
  );
}
