import type { DatasetDetailDto } from '@/lib/dal/datasets';
import { count, when } from '@/lib/format';
import { ReportTable } from './report-table';
import { WaiveForm } from './waive-form';

/**
 * The data check report of a dataset (every finding of the checks run at upload), the waivers with
 * their reasons, and the form to waive a warning rule.
 */
export function DatasetReport({ d }: { d: DatasetDetailDto }) {
  if (!d.report) return null;
  const waived = new Set(d.waivers.map((w) => w.rule));
  const warningRules = Object.entries(d.report.summary.byRule ?? {})
    .filter(([rule, e]) => e.severity === 'warning' && !waived.has(rule))
    .map(([rule, e]) => ({ rule, count: e.count }));
  return (
    <section id="report" className="panel scroll-mt-4 space-y-3 p-5" aria-labelledby="report-heading">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="report-heading">Data check report</h2>
        <a className="text-sm" href={`/api/datasets/${d.id}/report.csv`} download>
          The report as CSV
        </a>
      </div>
      <p className="text-sm text-[var(--color-muted)]" data-testid="report-counts">
        {d.report.status === 'processing'
          ? 'The header was checked at upload; the rows are checked by the conversion.'
          : d.report.status === 'failed'
            ? 'Only the header was checked: the rows were not, because the conversion did not finish.'
            : `${count(d.report.errorCount, 'error')}, ${count(d.report.warningCount, 'warning')}${d.waivers.length > 0 ? `, ${count(d.waivers.length, 'rule')} waived` : ''}${d.report.summary.truncated ? ' (only the first 1,000 findings of each rule are listed)' : ''}.`}
      </p>
      {d.waivers.length > 0 ? (
        <ul className="space-y-1 text-sm">
          {d.waivers.map((w) => (
            <li key={w.rule} className="notice-good">
              Waived <code>{w.rule}</code> by {w.by} on {when(w.at)}: {w.reason}
            </li>
          ))}
        </ul>
      ) : null}
      {d.report.status === 'accepted' || d.report.issues.length > 0 ? (
        <ReportTable issues={d.report.issues} caption="Data check report" summary={d.report.summary} waived={[...waived]} />
      ) : null}
      {d.canManage && warningRules.length > 0 ? (
        <div className="space-y-2 border-t border-[var(--color-line)] pt-3">
          <h3>Waive a warning</h3>
          <p className="text-xs text-[var(--color-muted)]">
            Waiving a rule records that the warnings were reviewed and why they are acceptable; the reason is kept with the dataset and shown
            to reviewers.
          </p>
          <WaiveForm datasetId={d.id} rules={warningRules} />
        </div>
      ) : null}
    </section>
  );
}
