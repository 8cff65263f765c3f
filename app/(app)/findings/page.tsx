import type { Metadata } from 'next';
import { FindingsTable } from '@/components/findings/findings-table';
import { requireUser } from '@/lib/auth/session';
import { listFindings } from '@/lib/dal/findings';

export const metadata: Metadata = { title: 'Findings' };

export default async function FindingsPage() {
  const actor = await requireUser();
  const all = await listFindings(actor);
  const unresolved = all.filter((f) => f.unresolved);
  const resolved = all.filter((f) => !f.unresolved);
  const overdue = unresolved.filter((f) => f.overdue).length;
  return (
    <div className="space-y-5">
      <div>
        <h1>Findings</h1>
        <p className="text-sm text-[var(--color-muted)]">
          What validators recorded on fits, datasets and assumption versions. A high-severity finding blocks approval until a validator closes
          it or accepts it with a rationale. {unresolved.length} unresolved{overdue ? `, ${overdue} past their due date` : ''}.
        </p>
      </div>
      <section className="panel p-4" aria-labelledby="unresolved-heading">
        <h2 id="unresolved-heading" className="mb-2">
          Unresolved
        </h2>
        <FindingsTable findings={unresolved} showTarget label="Unresolved findings" />
      </section>
      <section className="panel p-4" aria-labelledby="resolved-heading">
        <h2 id="resolved-heading" className="mb-2">
          Closed or accepted
        </h2>
        <FindingsTable findings={resolved} showTarget label="Closed or accepted findings" />
      </section>
    </div>
  );
}
