import Link from 'next/link';
import { ScrollBox } from '@/components/layout/scroll-box';
import { assetClassLabels } from '@/lib/asset-classes';
import type { DatasetDetailDto } from '@/lib/dal/datasets';
import { count, integer, pd } from '@/lib/format';
import { DefaultRateChart } from './default-rate-chart';

type Segment = DatasetDetailDto['segments'][number];

/**
 * One segment of a dataset: every period in a table shown whole (no inner scroll hides a year), its
 * rows as CSV, and the default-rate chart beside it.
 */
export function SegmentHistory({ datasetId, segment: s }: { datasetId: number; segment: Segment }) {
  return (
    <div className="panel grid gap-4 p-5 lg:grid-cols-[minmax(0,24rem)_1fr]">
      <div className="min-w-0">
        <h3>
          <Link href={`/data/segments/${s.segmentId}`}>{s.name}</Link>
        </h3>
        <p className="mb-2 text-xs text-[var(--color-muted)]">
          {assetClassLabels[s.assetClass]} · {count(s.rows.length, 'period')}
          {s.rows.length > 0 ? `, ${s.rows[0].period}–${s.rows[s.rows.length - 1].period}` : ''} ·{' '}
          <a href={`/api/datasets/${datasetId}/cohorts.csv?segment=${encodeURIComponent(s.name)}`} download>
            these rows as CSV
          </a>
        </p>
        <ScrollBox label={`Obligors and defaults by period, ${s.name} (scrolls sideways on narrow screens)`}>
          <table className="table">
            <caption className="sr-only">Obligors and defaults by period, {s.name}</caption>
            <thead>
              <tr>
                <th scope="col">Period</th>
                <th scope="col" className="text-right">
                  Obligors
                </th>
                <th scope="col" className="text-right">
                  Defaults
                </th>
                <th scope="col" className="text-right">
                  Default rate
                </th>
              </tr>
            </thead>
            <tbody>
              {s.rows.map((r) => (
                <tr key={r.period}>
                  <td className="num">{r.period}</td>
                  <td className="num text-right">{integer(r.obligors)}</td>
                  <td className="num text-right">{integer(r.defaults)}</td>
                  <td className="num text-right">{pd(r.obligors > 0 ? r.defaults / r.obligors : null)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollBox>
      </div>
      <DefaultRateChart name={s.name} rows={s.rows} />
    </div>
  );
}
