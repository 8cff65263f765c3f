import 'server-only';
import { desc, eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { mailCaptured, mailOutbox, type MailStatus } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { env } from '@/lib/env';
import { AppError } from '@/lib/errors';

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
  /** When the local capture server received it. */
  capturedAt: string | null;
  capturedTo: string[] | null;
};

/** Whether mail goes to the local capture server (no SMTP_URL) rather than a real one. */
export function mailIsCaptured(): boolean {
  return !env().SMTP_URL;
}

/**
 * The outbox of the local mail capture, for administrators: every message with its delivery state
 * (retries and errors shown) and what the capture server received. It exists only while mail is
 * captured locally (no SMTP_URL, whatever NODE_ENV: `npm start` runs the web app in production mode
 * and still captures); with a real SMTP server the messages are other people's mail, and the
 * outbox answers "not found".
 */
export async function listOutbox(actor: SessionUser, limit = 100): Promise<OutboxDto[]> {
  assertCan(actor, 'outbox:read', 'Only administrators can read the mail outbox.');
  const captured = mailIsCaptured();
  if (!captured) {
    throw new AppError('not_found:outbox', 'Mail is sent through the SMTP server in SMTP_URL; there is no local outbox to show.');
  }
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
    body: m.body,
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
