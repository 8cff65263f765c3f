import type { UploadIssue } from '@/lib/ingest/findings';
import type { FindingSummary } from '@/lib/ingest/findings';

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;

/**
 * The data check report, errors first, then warnings, each group with its count and a line per
 * rule; then every finding with its line, column, rule, the offending value and how to fix it.
 * Values from the file are shown as text (React escapes them). `summary`, when given, has the
 * true counts (findings beyond 1,000 per rule are counted but not stored).
 */
export function ReportTable({
  issues,
  caption,
  summary,
  waived = [],
}: {
  issues: UploadIssue[];
  caption?: string;
  summary?: FindingSummary;
  waived?: string[];
}) {
  if (issues.length === 0) return <p className="text-sm text-[var(--color-muted)]">No findings: every row passed every check.</p>;
  const groups = (['error', 'warning'] as const)
    .map((severity) => {
      const items = issues.filter((i) => i.severity === severity);
      const rules = new Map<string, { stored: number; count: number }>();
      for (const i of items) {
        const r = rules.get(i.rule) ?? { stored: 0, count: 0 };
        r.stored += 1;
        r.count = summary?.byRule[i.rule]?.count ?? r.stored;
        rules.set(i.rule, r);
      }
      const total = summary ? (severity === 'error' ? summary.errors : summary.warnings) : items.length;
      return { severity, items, rules, total };
    })
    .filter((g) => g.items.length > 0);

  return (
    <div className="space-y-4" data-testid="report-table">
      {caption ? <p className="sr-only">{caption}</p> : null}
      {groups.map((g) => {
        const isError = g.severity === 'error';
        const title = isError ? `Errors: ${plural(g.total, 'finding')}` : `Warnings: ${plural(g.total, 'finding')}`;
        return (
          <section key={g.severity} aria-label={isError ? 'Errors' : 'Warnings'} className="space-y-2">
            <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
              <h3 className={isError ? 'text-[var(--color-bad)]' : 'text-[var(--color-caution)]'}>{title}</h3>
              <p className="text-xs text-[var(--color-muted)]">
                {isError ? 'Each one blocks the upload: correct the file and upload it again.' : 'These do not block; review them, and waive a rule with a reason if it is expected.'}
              </p>
            </div>
            <ul className="flex flex-wrap gap-1.5 text-xs" aria-label={`${isError ? 'Errors' : 'Warnings'} by rule`}>
              {[...g.rules.entries()].map(([rule, r]) => (
                <li key={rule} className={`badge ${isError ? 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]' : 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]'}`}>
                  <span className="num">{rule}</span> × <span className="num">{r.count.toLocaleString('en-GB')}</span>
                  {r.count > r.stored ? ` (first ${r.stored.toLocaleString('en-GB')} listed)` : ''}
                  {waived.includes(rule) ? ' · waived' : ''}
                </li>
              ))}
            </ul>
            {g.items.length > 10 ? (
              <p className="text-xs text-[var(--color-muted)]">
                All {plural(g.items.length, 'listed finding')} are in the box below, which scrolls; the CSV has them for a spreadsheet.
              </p>
            ) : null}
            <div
              className="scroll-box relative max-h-[28rem] overflow-auto rounded border border-[var(--color-line)]"
              role="region"
              tabIndex={0}
              aria-label={`${caption ?? 'Data check report'}: ${isError ? 'errors' : 'warnings'} (the box scrolls)`}
            >
              <table className="table">
                <caption className="sr-only">
                  {caption ?? 'Data check report'}: {isError ? 'errors' : 'warnings'}
                </caption>
                <thead className="sticky top-0 bg-white">
                  <tr>
                    <th scope="col" className="w-16 text-right">
                      Line
                    </th>
                    <th scope="col">Column</th>
                    <th scope="col">Rule</th>
                    <th scope="col" className="sr-only">
                      Severity
                    </th>
                    <th scope="col">Value</th>
                    <th scope="col">What to fix</th>
                  </tr>
                </thead>
                <tbody>
                  {g.items.map((i, n) => (
                    <tr key={n}>
                      <td className="num text-right">{i.row ?? '—'}</td>
                      <td className="num text-xs">{i.column ?? '—'}</td>
                      <td className="num whitespace-nowrap text-xs">{i.rule}</td>
                      <td className="sr-only">{i.severity}</td>
                      <td className="num max-w-[12rem] truncate text-xs" title={i.value ?? ''}>
                        {i.value ?? ''}
                      </td>
                      <td className="text-sm">{i.message}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </section>
        );
      })}
    </div>
  );
}
