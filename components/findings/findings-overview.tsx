import Link from 'next/link';
import type { FindingDto } from '@/lib/dal/findings';
import { SeverityBadge } from './severity-badge';

/** The Overview's findings: how many are unresolved and overdue; the overdue ones first, then the high ones and mine. */
export function FindingsOverview({ unresolved, meId }: { unresolved: FindingDto[]; meId: number }) {
  const overdue = unresolved.filter((f) => f.overdue);
  const rest = unresolved.filter((f) => !f.overdue && (f.owner?.id === meId || f.severity === 'high'));
  const shown = [...overdue, ...rest].slice(0, 6);
  return (
    <section className="panel p-5" aria-label="Findings">
      <div className="flex items-baseline justify-between">
        <h2>Findings</h2>
        <Link href="/findings" className="text-sm">
          Open the findings
        </Link>
      </div>
      <p className="mt-2 text-sm" data-testid="findings-summary">
        {unresolved.length === 0 ? (
          'No finding is unresolved.'
        ) : (
          <>
            <span className="num">{unresolved.length}</span> unresolved
            {unresolved.some((f) => f.severity === 'high') ? (
              <>
                {' · '}
                <span className="font-medium text-[var(--color-bad)]">{unresolved.filter((f) => f.severity === 'high').length} high</span>
              </>
            ) : null}
            {overdue.length ? (
              <>
                {' · '}
                <span className="font-medium text-[var(--color-bad)]">{overdue.length} overdue</span>
              </>
            ) : null}
          </>
        )}
      </p>
      {shown.length ? (
        <ul className="mt-2 space-y-1 text-sm">
          {shown.map((f) => (
            <li key={f.id} className="flex flex-wrap items-center gap-x-2">
              <SeverityBadge severity={f.severity} />
              <Link href={`/findings/${f.id}`}>{f.title}</Link>
              <span className="text-[var(--color-muted)]">
                on {f.target.label}; {f.overdue ? `${-f.daysToDue} days overdue` : `${f.owner?.id === meId ? 'yours, ' : ''}due ${f.dueDate}`}
              </span>
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}
