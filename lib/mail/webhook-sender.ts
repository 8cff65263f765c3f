import { and, asc, eq, lte, sql } from 'drizzle-orm';
import type { Db } from '@/db/connection';
import { consumingModels, webhookDeliveries } from '@/db/schema';
import { backoffMs, MAX_ATTEMPTS } from './sender';
import { DELIVERY_HEADER, EVENT_HEADER, SIGNATURE_HEADER, signBody } from './webhook-signature';

/**
 * Sends the webhook outbox, as the mail outbox is sent (lib/mail/sender.ts) and by the same loop of
 * the worker: each due delivery is claimed by pushing its next attempt into the future (a lease),
 * POSTed with its signature, its delivery id and its event, and marked delivered on a 2xx answer;
 * anything else (another status, a refused connection, a timeout) is kept with the error and
 * retried with the mail's backoff (30 s, 1 min, 2 min, ... at most 1 h) up to MAX_ATTEMPTS, then
 * marked failed. The signature is computed at sending time with the model's current secret, so a
 * rotated secret applies to retries too. A publication never waits for any of this.
 */
const LEASE_MS = 2 * 60_000;
export const WEBHOOK_TIMEOUT_MS = 10_000;

export type WebhookReport = { delivered: number; failed: number; retrying: number };

export async function sendDueWebhooks(
  db: Db,
  now: Date = new Date(),
  opts: { batch?: number; fetchImpl?: typeof fetch; timeoutMs?: number } = {},
): Promise<WebhookReport> {
  const report: WebhookReport = { delivered: 0, failed: 0, retrying: 0 };
  const doFetch = opts.fetchImpl ?? fetch;
  const claimed = await db.transaction(async (tx) => {
    const rows = await tx
      .select({ d: webhookDeliveries, secret: consumingModels.webhookSecret })
      .from(webhookDeliveries)
      .innerJoin(consumingModels, eq(consumingModels.id, webhookDeliveries.modelId))
      .where(and(eq(webhookDeliveries.status, 'pending'), lte(webhookDeliveries.nextAttemptAt, now)))
      .orderBy(asc(webhookDeliveries.id))
      .limit(opts.batch ?? 20)
      .for('update', { skipLocked: true });
    for (const r of rows) {
      await tx
        .update(webhookDeliveries)
        .set({ nextAttemptAt: new Date(now.getTime() + LEASE_MS), attempts: sql`${webhookDeliveries.attempts} + 1` })
        .where(eq(webhookDeliveries.id, r.d.id));
    }
    return rows;
  });
  for (const { d, secret } of claimed) {
    const attempts = d.attempts + 1;
    let status: number | null = null;
    let error: string | null = null;
    try {
      const res = await doFetch(d.url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json',
          'user-agent': 'Rhobook-Webhooks/1',
          [EVENT_HEADER]: d.event,
          [DELIVERY_HEADER]: d.deliveryId,
          [SIGNATURE_HEADER]: signBody(secret ?? '', d.body),
        },
        body: d.body,
        redirect: 'manual',
        signal: AbortSignal.timeout(opts.timeoutMs ?? WEBHOOK_TIMEOUT_MS),
      });
      status = res.status;
      await res.body?.cancel().catch(() => undefined);
      if (res.status < 200 || res.status >= 300) error = `The receiver answered HTTP ${res.status}.`;
    } catch (err) {
      error = (err instanceof Error ? `${err.message}${err.cause instanceof Error ? `: ${err.cause.message}` : ''}` : String(err)).slice(0, 2000);
    }
    if (!error) {
      await db.update(webhookDeliveries).set({ status: 'delivered', lastStatus: status, lastError: null, deliveredAt: new Date() }).where(eq(webhookDeliveries.id, d.id));
      report.delivered += 1;
      continue;
    }
    const final = attempts >= MAX_ATTEMPTS;
    await db
      .update(webhookDeliveries)
      .set({ status: final ? 'failed' : 'pending', lastStatus: status, lastError: error, nextAttemptAt: new Date(now.getTime() + backoffMs(attempts)) })
      .where(eq(webhookDeliveries.id, d.id));
    if (final) report.failed += 1;
    else report.retrying += 1;
  }
  return report;
}
