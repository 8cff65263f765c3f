import { ScrollBox } from '@/components/layout/scroll-box';
import { fixed, integer, pd } from '@/lib/format';
import type { ReviewContext } from './types';

/** The segment's counts period by period, with the implied factor and PIT value of each year. */
export function DataSection({ seg }: ReviewContext) {
  const d = seg.diagnostics;
  return (
    <ScrollBox label="The data, period by period">
      <table className="table text-sm" data-testid="observed-table">
        <thead>
          <tr>
            <th>Period</th>
            <th className="text-right">Obligors</th>
            <th className="text-right">Defaults</th>
            <th className="text-right">Default rate</th>
            <th className="text-right">Implied factor</th>
            <th className="text-right">Probability integral transform (PIT)</th>
          </tr>
        </thead>
        <tbody>
          {seg.observed.map((o, t) => (
            <tr key={o.period}>
              <td>{o.period}</td>
              <td className="num text-right">{integer(o.obligors)}</td>
              <td className="num text-right">{integer(o.defaults)}</td>
              <td className="num text-right">{pd(o.dr)}</td>
              <td className="num text-right">{fixed(d.impliedFactor?.[t] ?? null, 2)}</td>
              <td className="num text-right">{fixed(d.pit?.[t] ?? null, 3)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </ScrollBox>
  );
}
