'use client';

import { ResponsiveLine, type LineCustomSvgLayerProps } from '@nivo/line';
import { pct } from '@/lib/format';

type Bands = { q005: number; q025: number; q25: number; q50: number; q75: number; q975: number; q995: number };
type Series = { id: string; data: { x: string; y: number }[] };

/**
 * Observed default rates by period against the fitted Vasicek default-rate distribution: shaded
 * central bands holding 50%, 95% and 99% of it (the same every period under the model), and the
 * median. Periods above the fitted 99% quantile are drawn in red, above the 95% quantile in amber
 * (the exceedances counted by the engine's diagnostics).
 */
export function BandsChart({ periods, rates, bands, q95, q99 }: { periods: string[]; rates: number[]; bands: Bands; q95: number; q99: number }) {
  const data: Series[] = [{ id: 'Observed default rate', data: periods.map((p, i) => ({ x: p, y: rates[i] })) }];
  const maxY = Math.max(bands.q995, ...rates) * 1.12;

  function BandsLayer(props: LineCustomSvgLayerProps<Series>) {
    const { yScale, innerWidth } = props;
    const y = (v: number) => yScale(v as never);
    const band = (lo: number, hi: number, opacity: number, key: string) => (
      <rect key={key} x={0} width={innerWidth} y={y(hi)} height={Math.max(0, y(lo) - y(hi))} fill="var(--color-accent)" fillOpacity={opacity} />
    );
    return (
      <g>
        {band(bands.q005, bands.q995, 0.1, '99')}
        {band(bands.q025, bands.q975, 0.14, '95')}
        {band(bands.q25, bands.q75, 0.22, '50')}
        <line x1={0} x2={innerWidth} y1={y(bands.q50)} y2={y(bands.q50)} stroke="var(--color-accent)" strokeDasharray="5 4" />
        <text x={innerWidth - 4} y={y(bands.q995) - 4} textAnchor="end" fontSize={10} fill="var(--color-muted)">
          99% band top {pct(bands.q995)}
        </text>
        <text x={innerWidth - 4} y={y(bands.q50) - 4} textAnchor="end" fontSize={10} fill="var(--color-accent)">
          median {pct(bands.q50)}
        </text>
      </g>
    );
  }

  function ExceedLayer(props: LineCustomSvgLayerProps<Series>) {
    return (
      <g>
        {props.points.map((p) => {
          const over = (p.data.y as number) > q99;
          const over95 = (p.data.y as number) > q95;
          return (
            <circle
              key={p.id}
              cx={p.x}
              cy={p.y}
              r={over ? 5 : 3.5}
              fill={over ? 'var(--color-bad)' : over95 ? 'var(--color-caution)' : 'var(--color-ink)'}
              stroke="white"
              strokeWidth={1}
            />
          );
        })}
      </g>
    );
  }

  return (
    <figure className="m-0">
    <div style={{ height: 280 }} role="img" aria-label="Observed default rates by period against the fitted 50%, 95% and 99% bands">
      <ResponsiveLine<Series>
        data={data}
        margin={{ top: 14, right: 16, bottom: 52, left: 58 }}
        xScale={{ type: 'point' }}
        yScale={{ type: 'linear', min: 0, max: maxY }}
        axisLeft={{ format: (v) => pct(Number(v), 2), tickValues: 5, legend: 'default rate', legendOffset: -52, legendPosition: 'middle' }}
        axisBottom={{ tickRotation: periods.length > 14 ? -45 : 0, legend: 'year', legendOffset: periods.length > 14 ? 42 : 32, legendPosition: 'middle' }}
        colors={['var(--color-ink)']}
        lineWidth={1.5}
        enablePoints={false}
        enableGridX={false}
        useMesh
        tooltip={({ point }) => (
          <div className="panel px-2 py-1 text-xs">
            {String(point.data.x)}: <span className="num">{pct(point.data.y as number)}</span>
          </div>
        )}
        layers={['grid', BandsLayer, 'axes', 'lines', ExceedLayer, 'mesh']}
        theme={{ text: { fontFamily: 'inherit', fontSize: 11 }, axis: { legend: { text: { fontSize: 11 } } } }}
      />
    </div>
    <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs text-[var(--color-muted)]" data-testid="bands-legend">
      <span>
        <LegendDot colour="var(--color-ink)" /> observed default rate
      </span>
      <span>
        <LegendDot colour="var(--color-caution)" /> above the fitted 95% quantile
      </span>
      <span>
        <LegendDot colour="var(--color-bad)" big /> above the fitted 99% quantile (an outlier)
      </span>
      <span>
        <span className="inline-block h-2.5 w-4 align-middle" style={{ background: 'var(--color-accent)', opacity: 0.35 }} /> central 50%, 95%, 99% of the
        fitted distribution
      </span>
      <span>
        <span className="inline-block w-4 border-t-2 border-dashed align-middle" style={{ borderColor: 'var(--color-accent)' }} /> fitted median
      </span>
    </figcaption>
    </figure>
  );
}

function LegendDot({ colour, big = false }: { colour: string; big?: boolean }) {
  const r = big ? 5 : 3.5;
  return (
    <svg width={12} height={12} viewBox="0 0 12 12" className="inline-block align-middle" aria-hidden="true">
      <circle cx={6} cy={6} r={r} fill={colour} stroke="white" strokeWidth={1} />
    </svg>
  );
}
