import type { FindingTarget } from '@/db/schema';
import type { FindingDto } from '@/lib/dal/findings';
import { FindingsTable } from './findings-table';
import { RecordFindingForm } from './record-finding-form';

/**
 * The findings of a fit, a dataset or a version (with, for a version, those on its fit and
 * dataset), and for validators the form to record one on it.
 */
export function FindingsSection({
  findings,
  target,
  owners,
  defaultDue,
  title = 'Validation findings',
  note,
}: {
  findings: FindingDto[];
  target: { type: FindingTarget; id: number };
  /** Who may own a finding; null when the person looking may not record one. */
  owners: { id: number; name: string; role: string }[] | null;
  defaultDue: string;
  title?: string;
  note?: string;
}) {
  const open = findings.filter((f) => f.unresolved);
  const blocking = open.filter((f) => f.severity === 'high');
  return (
    <section className="panel space-y-3 p-5" aria-labelledby="findings-heading" data-testid="findings-section">
      <div className="flex flex-wrap items-baseline gap-3">
        <h2 id="findings-heading">{title}</h2>
        <span className="text-sm text-[var(--color-muted)]">
          {open.length} unresolved of {findings.length}
        </span>
      </div>
      {note ? <p className="text-sm text-[var(--color-muted)]">{note}</p> : null}
      {blocking.length && target.type === 'version' ? (
        <p className="notice-bad text-sm" data-testid="blocking-finding">
          A high-severity finding is unresolved: this version cannot be approved until a validator closes it or accepts it with a rationale.
        </p>
      ) : null}
      <FindingsTable findings={findings} showTarget={target.type === 'version'} />
      {owners ? <RecordFindingForm target={target} owners={owners} defaultDue={defaultDue} /> : null}
    </section>
  );
}
