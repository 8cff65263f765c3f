import Link from 'next/link';
import type { FindingDto } from '@/lib/dal/findings';
import { SeverityBadge } from './severity-badge';

/** Findings as a table: title, severity, status, owner, due date and (when asked) what each is on. */
export function FindingsTable({ findings, showTarget = false, label = 'Findings' }: { findings: FindingDto[]; showTarget?: boolean; label?: string }) {
  if (!findings.length) return <p className="text-sm text-[var(--color-muted)]">No findings recorded.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="table" aria-label={label}>
        <thead>
          <tr>
            <th>Finding</th>
            <th>Severity</th>
            <th>Status</th>
            {showTarget ? <th>On</th> : null}
            <th>Owner</th>
            <th>Due</th>
          </tr>
        </thead>
        <tbody>
          {findings.map((f) => (
            <tr key={f.id} data-testid={`finding-${f.id}`}>
              <td>
                <Link href={`/findings/${f.id}`}>{f.title}</Link>
              </td>
              <td>
                <SeverityBadge severity={f.severity} />
              </td>
              <td>{f.statusLabel}</td>
              {showTarget ? (
                <td>
                  <Link href={f.target.url}>{f.target.label}</Link>
                </td>
              ) : null}
              <td>{f.owner?.name ?? '—'}</td>
              <td className={`num whitespace-nowrap ${f.overdue ? 'font-medium text-[var(--color-bad)]' : ''}`}>
                {f.dueDate}
                {f.overdue ? ` (${-f.daysToDue} d overdue)` : ''}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
