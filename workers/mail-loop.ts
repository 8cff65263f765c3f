import type { Db } from '@/db/connection';
import { openTransport, sendDueMail } from '@/lib/mail/sender';
import { sendDueWebhooks } from '@/lib/mail/webhook-sender';

/**
 * Sends the mail outbox and the webhook outbox every few seconds until the worker stops
 * (lib/mail/sender.ts, lib/mail/webhook-sender.ts). A failure
 * to reach the SMTP server is kept on the message and retried with backoff; it never stops the
 * loop and never blocks a transition (those only write the outbox).
 */
export async function runMailLoop(opts: { db: Db; signal: AbortSignal; intervalMs?: number }): Promise<void> {
  let transport: Awaited<ReturnType<typeof openTransport>> | null = null;
  while (!transport && !opts.signal.aborted) {
    transport = await openTransport(opts.db).catch((err) => {
      console.error('[worker] mail: cannot open the transport, retrying in 30 s:', err instanceof Error ? err.message : err);
      return null;
    });
    if (!transport) await sleep(30_000, opts.signal);
  }
  if (!transport) return;
  console.log(`[worker] mail: sending through the ${transport.describe}`);
  const interval = opts.intervalMs ?? 3_000;
  try {
    while (!opts.signal.aborted) {
      try {
        const r = await sendDueMail(opts.db, transport.transporter);
        if (r.sent || r.failed || r.retrying) console.log(`[worker] mail: ${r.sent} sent, ${r.retrying} to retry, ${r.failed} failed for good`);
      } catch (err) {
        console.error('[worker] mail loop error:', err instanceof Error ? err.message : err);
      }
      try {
        const w = await sendDueWebhooks(opts.db);
        if (w.delivered || w.failed || w.retrying) console.log(`[worker] webhooks: ${w.delivered} delivered, ${w.retrying} to retry, ${w.failed} failed for good`);
      } catch (err) {
        console.error('[worker] webhook loop error:', err instanceof Error ? err.message : err);
      }
      await sleep(interval, opts.signal);
    }
  } finally {
    await transport.close().catch(() => undefined);
  }
}

export function sleep(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const t = setTimeout(done, ms);
    function done() {
      clearTimeout(t);
      signal.removeEventListener('abort', done);
      resolve();
    }
    signal.addEventListener('abort', done, { once: true });
  });
}
