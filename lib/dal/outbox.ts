import 'server-only';
import { desc, eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { mailCaptured, mailOutbox, type MailStatus } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { env } from '@/lib/env';

export type OutboxDto = {
  id: number;
  kind: string;
  to: string;
  subject: string;
  body: string;
  status: MailStatus;
  attempts: number;
  nextAttemptAt: string;
  lastError: string | null;
  sentAt: string | null;
  createdAt: string;
  /** When the local capture server received it (development and tests). */
  capturedAt: string | null;
  capturedTo: string[] | null;
};

/** Whether mail goes to the local capture server (no SMTP_URL) rather than a real one. */
export function mailIsCaptured(): boolean {
  return !env().SMTP_URL;
}

/**
 * The outbox for administrators: every message with its delivery state (retries and errors shown),
 * and, when mail is captured locally, what the capture server received. Message bodies are shown
 * only in capture mode: with a real SMTP server they are other people's mail.
 */
export async function listOutbox(actor: SessionUser, limit = 100): Promise<OutboxDto[]> {
  assertCan(actor, 'outbox:read', 'Only administrators can read the mail outbox.');
  const captured = mailIsCaptured();
  const rows = await getDb()
    .select({ m: mailOutbox, capturedAt: mailCaptured.receivedAt, capturedTo: mailCaptured.envelopeTo })
    .from(mailOutbox)
    .leftJoin(mailCaptured, eq(mailCaptured.outboxId, mailOutbox.id))
    .orderBy(desc(mailOutbox.id))
    .limit(Math.min(limit, 500));
  return rows.map(({ m, capturedAt, capturedTo }) => ({
    id: m.id,
    kind: m.kind,
    to: m.toAddress,
    subject: m.subject,
    body: captured ? m.body : '',
    status: m.status,
    attempts: m.attempts,
    nextAttemptAt: m.nextAttemptAt.toISOString(),
    lastError: m.lastError,
    sentAt: m.sentAt?.toISOString() ?? null,
    createdAt: m.createdAt.toISOString(),
    capturedAt: capturedAt?.toISOString() ?? null,
    capturedTo: Array.isArray(capturedTo) ? (capturedTo as string[]) : null,
  }));
}
