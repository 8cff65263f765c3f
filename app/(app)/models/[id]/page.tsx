import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { ModelActions } from '@/components/models/model-actions';
import { ModelForm } from '@/components/models/model-form';
import { requireUser } from '@/lib/auth/session';
import { getModel, listAssumptionChoices } from '@/lib/dal/models';
import { AppError } from '@/lib/errors';
import { routeId } from '@/lib/http/route-params';

export const metadata: Metadata = { title: 'Consuming model' };

const when = (s: string | null) => (s ? s.replace('T', ' ').slice(0, 19) : '—');

export default async function ModelPage({ params }: { params: Promise<{ id: string }> }) {
  const actor = await requireUser();
  const m = await routeId({ params }, 'id', 'not_found:model', 'There is no such model.')
    .then((id) => getModel(actor, id))
    .catch((err) => {
      if (err instanceof AppError && err.kind === 'not_found') notFound();
      throw err;
    });
  const choices = m.mayManage ? await listAssumptionChoices(actor) : [];
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link href="/models">Consuming models</Link> / {m.name}
      </p>
      <div>
        <h1>{m.name}</h1>
        <p className="mt-1 text-sm text-[var(--color-muted)]">
          Owner {m.ownerName} ({m.contactEmail}) · {m.active ? 'active' : 'inactive'} · registered {m.createdAt.slice(0, 10)}
        </p>
        <p className="mt-1 max-w-3xl text-sm">{m.intendedUse}</p>
      </div>
      <section className="grid gap-4 lg:grid-cols-2">
        <div className="panel p-5">
          <h2 className="mb-2">Assumptions it uses</h2>
          {m.assumptions.length === 0 ? (
            <p className="text-sm text-[var(--color-muted)]">None yet.</p>
          ) : (
            <ul className="space-y-1 text-sm" data-testid="model-assumptions">
              {m.assumptions.map((a) => (
                <li key={a.assumptionId}>
                  {a.published ? <Link href={`/library/versions/${a.published.versionId}`}>{a.segment}</Link> : a.segment}{' '}
                  <span className="text-[var(--color-muted)]">{a.published ? `published v${a.published.version}` : 'nothing published'}</span>
                </li>
              ))}
            </ul>
          )}
          <h3 className="mt-4 mb-1">API tokens for this model</h3>
          {m.tokenList.length === 0 ? (
            <p className="text-sm text-[var(--color-muted)]">None. An administrator ties a token to the model under Admin, API tokens.</p>
          ) : (
            <ul className="text-sm">
              {m.tokenList.map((t) => (
                <li key={t.id}>
                  {t.name} <span className="num text-xs">{t.prefix}…</span> {t.revoked ? <span className="badge">revoked</span> : null}
                </li>
              ))}
            </ul>
          )}
        </div>
        <div className="panel space-y-3 p-5">
          <h2>Webhook</h2>
          {m.webhookUrl ? (
            <>
              <p className="text-sm">
                POST to <code className="break-all">{m.webhookUrl}</code>, signed with HMAC-SHA256 over the body (header <code>X-Rhobook-Signature: sha256=…</code>), with the
                delivery id in <code>X-Rhobook-Delivery</code> (the same on every retry) and the event in <code>X-Rhobook-Event</code>. Failed deliveries
                are retried with backoff, eight times at most.
              </p>
              {m.mayManage ? <ModelActions id={m.id} /> : null}
            </>
          ) : (
            <p className="text-sm text-[var(--color-muted)]">No webhook URL: the owner is told by e-mail only.</p>
          )}
        </div>
      </section>
      {m.webhookUrl || m.deliveryLog.length ? (
        <section className="panel overflow-x-auto p-2">
          <h2 className="p-2">Webhook deliveries</h2>
          <table className="table" aria-label="Webhook deliveries">
            <thead>
              <tr>
                <th>Queued (UTC)</th>
                <th>Event</th>
                <th>Delivery id</th>
                <th>State</th>
                <th>Attempts</th>
                <th>Last answer</th>
                <th>Received here</th>
              </tr>
            </thead>
            <tbody>
              {m.deliveryLog.map((d) => (
                <tr key={d.id} data-testid={`delivery-${d.deliveryId}`}>
                  <td className="num whitespace-nowrap">{when(d.createdAt)}</td>
                  <td>
                    {d.event}
                    {d.versionId ? (
                      <>
                        {' '}
                        <Link className="text-xs" href={`/library/versions/${d.versionId}`}>
                          version
                        </Link>
                      </>
                    ) : null}
                  </td>
                  <td className="num text-xs">{d.deliveryId}</td>
                  <td>
                    <span className={`badge ${d.status === 'failed' ? 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]' : d.status === 'delivered' ? 'bg-[var(--color-good-soft)] text-[var(--color-good)]' : ''}`}>
                      {d.status}
                    </span>
                    {d.status === 'pending' && d.attempts > 0 ? <span className="block text-xs">next try {when(d.nextAttemptAt)}</span> : null}
                  </td>
                  <td className="num">{d.attempts}</td>
                  <td className="text-xs">{d.lastError ?? (d.lastStatus ? `HTTP ${d.lastStatus}` : '—')}</td>
                  <td className="text-xs">{d.received ? `${when(d.received.at)}, signature ${d.received.signatureValid ? 'valid' : 'INVALID'}` : '—'}</td>
                </tr>
              ))}
              {m.deliveryLog.length === 0 ? (
                <tr>
                  <td colSpan={7} className="text-[var(--color-muted)]">
                    Nothing sent yet.
                  </td>
                </tr>
              ) : null}
            </tbody>
          </table>
        </section>
      ) : null}
      {m.mayManage ? (
        <section className="panel p-5">
          <h2 className="mb-3">Change the model</h2>
          <ModelForm
            choices={choices}
            initial={{
              id: m.id,
              name: m.name,
              ownerName: m.ownerName,
              contactEmail: m.contactEmail,
              intendedUse: m.intendedUse,
              webhookUrl: m.webhookUrl,
              assumptionIds: m.assumptions.map((a) => a.assumptionId),
            }}
          />
        </section>
      ) : null}
    </div>
  );
}
