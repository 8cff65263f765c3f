import { and, asc, eq, lte, sql } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Db } from '@/db/connection';
import { mailOutbox } from '@/db/schema';
import { env } from '@/lib/env';
import { startCaptureServer, type CaptureServer } from './capture-server';

/**
 * Sends the outbox. Production: nodemailer over SMTP_URL. Development and tests (no SMTP_URL): a
 * capturing SMTP server on loopback in this process (capture-server.ts).
 *
 * Each message is claimed by pushing its next attempt into the future (a lease, so that two
 * workers do not send it twice while one is talking to the server), then sent, then marked sent;
 * a failure is kept with the error and retried with exponential backoff (30 s, 1 min, 2 min, ...
 * at most 1 h) up to MAX_ATTEMPTS, then marked failed. Transitions never wait for any of this.
 */
export const MAX_ATTEMPTS = 8;
const LEASE_MS = 2 * 60_000;

export function backoffMs(attempts: number): number {
  return Math.min(30_000 * 2 ** Math.max(0, attempts - 1), 60 * 60_000);
}

export type MailTransport = { transporter: Transporter; mode: 'smtp' | 'capture'; close: () => Promise<void>; describe: string };

export async function openTransport(db: Db): Promise<MailTransport> {
  const url = env().SMTP_URL;
  if (url) {
    const transporter = nodemailer.createTransport(url);
    return { transporter, mode: 'smtp', close: async () => transporter.close(), describe: `SMTP server ${new URL(url).host}` };
  }
  const capture: CaptureServer = await startCaptureServer(db);
  const transporter = nodemailer.createTransport({ host: '127.0.0.1', port: capture.port, secure: false, ignoreTLS: true });
  return {
    transporter,
    mode: 'capture',
    describe: `local capture server on 127.0.0.1:${capture.port}`,
    close: async () => {
      transporter.close();
      await capture.close();
    },
  };
}

export type SendReport = { sent: number; failed: number; retrying: number };

/** Sends what is due now; returns what happened. */
export async function sendDueMail(db: Db, transporter: Transporter, now: Date = new Date(), batch = 20): Promise<SendReport> {
  const report: SendReport = { sent: 0, failed: 0, retrying: 0 };
  const claimed = await db.transaction(async (tx) => {
    const rows = await tx
      .select()
      .from(mailOutbox)
      .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, now)))
      .orderBy(asc(mailOutbox.id))
      .limit(batch)
      .for('update', { skipLocked: true });
    for (const r of rows) {
      await tx
        .update(mailOutbox)
        .set({ nextAttemptAt: new Date(now.getTime() + LEASE_MS), attempts: sql`${mailOutbox.attempts} + 1` })
        .where(eq(mailOutbox.id, r.id));
    }
    return rows;
  });
  for (const m of claimed) {
    const attempts = m.attempts + 1;
    try {
      await transporter.sendMail({
        from: env().MAIL_FROM,
        to: m.toAddress,
        subject: m.subject,
        text: m.body,
        headers: { 'X-Rhobook-Outbox-Id': String(m.id) },
      });
      await db.update(mailOutbox).set({ status: 'sent', sentAt: new Date(), lastError: null }).where(eq(mailOutbox.id, m.id));
      report.sent += 1;
    } catch (err) {
      const message = (err instanceof Error ? err.message : String(err)).slice(0, 2000);
      const final = attempts >= MAX_ATTEMPTS;
      await db
        .update(mailOutbox)
        .set({
          status: final ? 'failed' : 'pending',
          lastError: message,
          nextAttemptAt: new Date(Date.now() + backoffMs(attempts)),
        })
        .where(eq(mailOutbox.id, m.id));
      if (final) report.failed += 1;
      else report.retrying += 1;
    }
  }
  return report;
}
