/**
 * A correlation matrix as a table coloured by value (the fit's pairs, a matrix assumption's value),
 * the values in the cells.
 */

/** Blue for negative, red for positive correlations; lighter toward 0. */
function cellColour(r: number | null): string {
  if (r === null) return 'transparent';
  const a = Math.min(1, Math.abs(r));
  return r >= 0 ? `rgba(200, 60, 40, ${0.12 + 0.6 * a})` : `rgba(40, 90, 200, ${0.12 + 0.6 * a})`;
}

export function Heatmap({ title, segments, matrix, testId }: { title: string; segments: string[]; matrix: (number | null)[][]; testId: string }) {
  return (
    <table className="table text-xs" data-testid={testId}>
      <caption className="text-left text-sm font-medium">{title}</caption>
      <thead>
        <tr>
          <th scope="col" />
          {segments.map((s) => (
            <th key={s} scope="col">
              {s}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {segments.map((s, i) => (
          <tr key={s}>
            <th scope="row">{s}</th>
            {matrix[i].map((v, j) => (
              <td key={j} style={{ background: cellColour(v) }} className="text-center tabular-nums">
                {v === null ? '–' : v.toFixed(2)}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
