'use client';

import { ResponsiveLine } from '@nivo/line';

/** Annual default rate (defaults / obligors) of one segment, in percent. */
export function DefaultRateChart({ name, rows }: { name: string; rows: { period: number; obligors: number; defaults: number }[] }) {
  const data = [
    {
      id: name,
      data: rows.map((r) => ({ x: r.period, y: (100 * r.defaults) / r.obligors })),
    },
  ];
  const mean = rows.reduce((s, r) => s + r.defaults, 0) / Math.max(1, rows.reduce((s, r) => s + r.obligors, 0));
  // Whole years only on the axis (a linear scale would label 2015.2, 2015.4, ... for short histories).
  const first = Math.min(...rows.map((r) => r.period));
  const last = Math.max(...rows.map((r) => r.period));
  const step = Math.max(1, Math.ceil((last - first) / 10));
  const ticks: number[] = [];
  for (let y = first; y <= last; y += step) ticks.push(y);
  return (
    <figure className="h-56" aria-label={`Default rate by period, ${name}`} data-testid="default-rate-chart">
      <ResponsiveLine
        data={data}
        margin={{ top: 12, right: 16, bottom: 36, left: 52 }}
        xScale={{ type: 'linear', min: first, max: Math.max(last, first + 1) }}
        yScale={{ type: 'linear', min: 0, max: 'auto' }}
        axisBottom={{ tickSize: 4, tickValues: ticks, legend: 'period', legendOffset: 28, legendPosition: 'middle', format: (v) => String(v) }}
        axisLeft={{ tickSize: 4, legend: 'default rate, %', legendOffset: -44, legendPosition: 'middle' }}
        colors={['#1f5f6b']}
        pointSize={5}
        enableGridX={false}
        useMesh
        markers={[
          {
            axis: 'y',
            value: 100 * mean,
            lineStyle: { stroke: '#8a5a00', strokeDasharray: '4 4', strokeWidth: 1 },
            legend: `pooled ${(100 * mean).toFixed(2)}%`,
            legendPosition: 'top-right',
            textStyle: { fontSize: 11, fill: '#8a5a00' },
          },
        ]}
        tooltip={({ point }) => (
          <div className="rounded border border-[var(--color-line)] bg-white px-2 py-1 text-xs shadow">
            {String(point.data.x)}: {Number(point.data.y).toFixed(2)}%
          </div>
        )}
        theme={{ text: { fontSize: 11, fill: '#5c666c' }, grid: { line: { stroke: '#ecece6' } } }}
      />
    </figure>
  );
}
