import type { Metadata } from 'next';
import Link from 'next/link';
import { ModelForm } from '@/components/models/model-form';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listAssumptionChoices, listModels } from '@/lib/dal/models';

export const metadata: Metadata = { title: 'Consuming models' };

export default async function ModelsPage() {
  const actor = await requireUser();
  const [models, choices] = await Promise.all([listModels(actor), listAssumptionChoices(actor)]);
  return (
    <div className="space-y-5">
      <div>
        <h1>Consuming models</h1>
        <p className="max-w-3xl text-sm text-[var(--color-muted)]">
          The downstream models that read published assumptions: who owns them, what they use each value for, and which assumptions each uses. Their
          owners are told by e-mail, and by a signed webhook where one is registered, when a value they use is published, superseded, overdue, withdrawn
          or retired.
        </p>
      </div>
      <section className="panel overflow-x-auto p-2">
        <table className="table" aria-label="Consuming models">
          <thead>
            <tr>
              <th>Model</th>
              <th>Owner</th>
              <th>Uses</th>
              <th>Webhook</th>
              <th>Deliveries</th>
            </tr>
          </thead>
          <tbody>
            {models.map((m) => (
              <tr key={m.id} data-testid={`model-row-${m.id}`}>
                <td>
                  <Link href={`/models/${m.id}`}>{m.name}</Link>
                  {m.active ? null : <span className="badge ml-1">inactive</span>}
                  <span className="block text-xs text-[var(--color-muted)]">{m.intendedUse}</span>
                </td>
                <td>
                  {m.ownerName}
                  <span className="block text-xs text-[var(--color-muted)]">{m.contactEmail}</span>
                </td>
                <td>{m.assumptions.map((a) => a.segment).join(', ') || '—'}</td>
                <td className="text-xs break-all">{m.webhookUrl ?? '—'}</td>
                <td className="text-sm">
                  {m.deliveries.pending ? `${m.deliveries.pending} pending` : ''}
                  {m.deliveries.failed ? <span className="text-[var(--color-bad)]"> {m.deliveries.failed} failed</span> : null}
                  {!m.deliveries.pending && !m.deliveries.failed ? '—' : null}
                </td>
              </tr>
            ))}
            {models.length === 0 ? (
              <tr>
                <td colSpan={5} className="text-[var(--color-muted)]">
                  No model is registered yet.
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </section>
      {can(actor.role, 'models:manage') ? (
        <section className="panel p-5">
          <h2 className="mb-3">Register a model</h2>
          <ModelForm choices={choices} />
        </section>
      ) : null}
    </div>
  );
}
