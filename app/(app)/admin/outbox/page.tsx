import type { Metadata } from 'next';
import Link from 'next/link';
import { forbidden, notFound } from 'next/navigation';
import { can } from '@/lib/auth/permissions';
import { requireUser } from '@/lib/auth/session';
import { listOutbox, mailIsCaptured } from '@/lib/dal/outbox';

export const metadata: Metadata = { title: 'Mail outbox' };

const at = (s: string | null) => (s ? s.replace('T', ' ').slice(0, 19) : '—');

export default async function OutboxPage() {
  const actor = await requireUser();
  if (!can(actor.role, 'outbox:read')) forbidden();
  // The outbox is the local capture's: with a real SMTP server (SMTP_URL) there is none to show.
  if (!mailIsCaptured()) notFound();
  const mail = await listOutbox(actor);
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link href="/admin">Admin</Link> / mail outbox
      </p>
      <h1>Mail outbox (local capture)</h1>
      <p className="notice-caution text-sm" data-testid="capture-notice">
        This is the local mail capture. No SMTP_URL is set, so the worker delivers every message to a capturing SMTP server
        on loopback (127.0.0.1) inside the worker: nothing leaves this machine, and the messages are shown below. Set
        SMTP_URL to send through a real mail server; this screen then disappears. A failed send is retried with backoff and
        never blocks a transition.
      </p>
      <section className="space-y-2">
        {mail.map((m) => (
          <details key={m.id} className="panel p-3" data-testid={`mail-${m.id}`}>
            <summary className="flex cursor-pointer flex-wrap items-center gap-3 text-sm">
              <span
                className={`badge ${m.status === 'sent' ? 'bg-[var(--color-good-soft)] text-[var(--color-good)]' : m.status === 'failed' ? 'bg-[var(--color-bad-soft)] text-[var(--color-bad)]' : 'bg-[var(--color-caution-soft)] text-[var(--color-caution)]'}`}
              >
                {m.status}
              </span>
              <span className="num text-xs">{at(m.createdAt)}</span>
              <span>{m.to}</span>
              <span className="font-medium">{m.subject}</span>
              {m.attempts > 1 || m.lastError ? (
                <span className="text-xs text-[var(--color-bad)]">
                  attempt {m.attempts}
                  {m.status === 'pending' ? `, next at ${at(m.nextAttemptAt)}` : ''}: {m.lastError}
                </span>
              ) : null}
            </summary>
            <div className="mt-2 text-sm">
              <p className="text-xs text-[var(--color-muted)]">
                Sent {at(m.sentAt)}; captured {at(m.capturedAt)}
                {m.capturedTo ? ` for ${m.capturedTo.join(', ')}` : ''}
              </p>
              <pre className="mt-2 whitespace-pre-wrap font-sans">{m.body}</pre>
            </div>
          </details>
        ))}
        {mail.length === 0 ? <p className="text-sm text-[var(--color-muted)]">No mail yet.</p> : null}
      </section>
    </div>
  );
}
