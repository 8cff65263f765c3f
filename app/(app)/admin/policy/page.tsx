import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden } from 'next/navigation';
import { OverduePolicyForm } from '@/components/admin/overdue-policy-form';
import { overduePolicyLabels } from '@/lib/assumptions/overdue-policy';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { getOverduePolicy } from '@/lib/dal/overdue-policy';

export const metadata: Metadata = { title: 'Overdue policy' };

export default async function OverduePolicyPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'settings:manage')) forbidden();
  const p = await getOverduePolicy(actor);
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link href="/admin">Admin</Link> / Overdue policy
      </p>
      <h1>Overdue policy</h1>
      <section className="panel space-y-3 p-5">
        <p className="text-sm" data-testid="policy-in-force">
          In force: <strong>{overduePolicyLabels[p.current]}</strong>
          {p.isDefault ? ' (the default)' : ''}.
        </p>
        <p className="max-w-3xl text-sm text-[var(--color-muted)]">
          Most institutions&apos; policies keep a value readable past its review-by date, flagged overdue, so that downstream models do not lose it
          overnight; others withdraw it. The consumer API says which policy applied to each answer. Either way, an escalation e-mail goes to the
          validators and administrators. A change applies from now on: answers for past dates keep the policy of then.
        </p>
        <OverduePolicyForm current={p.current} />
      </section>
      {p.history.length ? (
        <section className="panel p-5">
          <h2 className="mb-2">Changes</h2>
          <table className="table" aria-label="Changes of the overdue policy">
            <thead>
              <tr>
                <th>When (UTC)</th>
                <th>Policy</th>
                <th>By</th>
                <th>Reason</th>
              </tr>
            </thead>
            <tbody>
              {p.history.map((h) => (
                <tr key={h.at}>
                  <td className="num">{h.at.replace('T', ' ').slice(0, 16)}</td>
                  <td>{h.policy}</td>
                  <td>{h.by}</td>
                  <td className="whitespace-pre-wrap">{h.reason}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      ) : null}
    </div>
  );
}
