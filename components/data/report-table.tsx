import type { UploadIssue } from '@/lib/datasets/store';

/**
 * The validation report as a table: line, column, rule, severity, the offending value and how to
 * fix it. Values from the file are shown as text (React escapes them).
 */
export function ReportTable({ issues, caption }: { issues: UploadIssue[]; caption?: string }) {
  if (issues.length === 0) return <p className="text-sm text-[var(--color-muted)]">No findings.</p>;
  return (
    <div className="max-h-[28rem] overflow-auto rounded border border-[var(--color-line)]">
      <table className="table" data-testid="report-table">
        {caption ? <caption className="sr-only">{caption}</caption> : null}
        <thead className="sticky top-0 bg-white">
          <tr>
            <th scope="col">Line</th>
            <th scope="col">Column</th>
            <th scope="col">Rule</th>
            <th scope="col">Severity</th>
            <th scope="col">Value</th>
            <th scope="col">What to fix</th>
          </tr>
        </thead>
        <tbody>
          {issues.map((i, n) => (
            <tr key={n}>
              <td className="num">{i.row ?? '—'}</td>
              <td className="num text-xs">{i.column ?? '—'}</td>
              <td className="num text-xs whitespace-nowrap">{i.rule}</td>
              <td>
                <span
                  className={`badge ${i.severity === 'error' ? 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]' : 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]'}`}
                >
                  {i.severity}
                </span>
              </td>
              <td className="num max-w-[12rem] truncate text-xs" title={i.value ?? ''}>
                {i.value ?? ''}
              </td>
              <td className="text-sm">{i.message}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
