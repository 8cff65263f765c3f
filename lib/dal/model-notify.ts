import 'server-only';
import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { consumingModelAssumptions, consumingModels, webhookDeliveries, type AssumptionVersion } from '@/db/schema';
import { appUrl } from '@/lib/env';
import { queueMail } from '@/lib/mail/outbox';
import { renderModelMail, type ModelEvent } from '@/lib/mail/templates';

/**
 * Tells the models that use an assumption of an event of one of its versions: an e-mail to each
 * model's contact and, where the model registered a webhook URL, a signed JSON delivery in the
 * webhook outbox (lib/mail/webhook-sender.ts sends it). Written in the transaction of the change,
 * once per model, version and event (and review-by date, for an overdue value). Checks no role:
 * the lifecycle and the scheduler call it.
 */
export type ModelEventBody = {
  event: ModelEvent | 'ping';
  deliveryId: string;
  occurredAt: string;
  model: { id: number; name: string };
  assumption: {
    assumptionId: number;
    segment: string;
    version: number;
    status: string;
    value: number;
    pd: number;
    effectiveDate: string;
    reviewBy: string;
    supersededBy: number | null;
    /** The version's page in Rhobook. */
    url: string;
    /** The consumer API's answer for exactly this version. */
    api: string;
  } | null;
};

export async function notifyModels(
  tx: DbOrTx,
  v: Pick<AssumptionVersion, 'id' | 'assumptionId' | 'version' | 'status' | 'finalValue' | 'pd' | 'effectiveDate' | 'reviewBy'>,
  segment: string,
  event: ModelEvent,
  now: Date,
  opts: { supersededBy?: number | null } = {},
): Promise<{ mails: number; webhooks: number }> {
  const models = await tx
    .select({ m: consumingModels })
    .from(consumingModelAssumptions)
    .innerJoin(consumingModels, eq(consumingModels.id, consumingModelAssumptions.modelId))
    .where(and(eq(consumingModelAssumptions.assumptionId, v.assumptionId), eq(consumingModels.active, true)));
  let mails = 0;
  let webhooks = 0;
  const once = event === 'assumption.overdue' || event === 'assumption.withdrawn' ? `${event}:${v.reviewBy}` : event;
  const url = appUrl(`/library/versions/${v.id}`);
  const facts = { segment, version: v.version, value: v.finalValue, pd: v.pd, effectiveDate: v.effectiveDate, reviewBy: v.reviewBy, supersededBy: opts.supersededBy ?? null, url };
  for (const { m } of models) {
    const key = `model:${m.id}:${v.id}:${once}`;
    mails += await queueMail(tx, {
      kind: 'model-notice',
      to: [m.contactEmail],
      versionId: v.id,
      dedupeKey: (addr) => `${key}:${addr}`.slice(0, 160),
      message: renderModelMail(event, { model: m.name, ...facts }),
    });
    if (!m.webhookUrl) continue;
    const deliveryId = randomUUID();
    const body: ModelEventBody = {
      event,
      deliveryId,
      occurredAt: now.toISOString(),
      model: { id: m.id, name: m.name },
      assumption: {
        assumptionId: v.assumptionId,
        status: v.status,
        ...facts,
        api: appUrl(`/api/v1/assumptions/${v.assumptionId}/versions/${v.version}`),
      },
    };
    const [res] = await tx
      .insert(webhookDeliveries)
      .ignore()
      .values({ deliveryId, modelId: m.id, event, versionId: v.id, url: m.webhookUrl, body: JSON.stringify(body), dedupeKey: key.slice(0, 160), nextAttemptAt: now, createdAt: now });
    webhooks += res.affectedRows;
  }
  return { mails, webhooks };
}

/** A test event to one model's webhook (the model's page offers it), outside the deduplication. */
export async function queuePing(tx: DbOrTx, m: { id: number; name: string; webhookUrl: string }, now: Date): Promise<string> {
  const deliveryId = randomUUID();
  const body: ModelEventBody = { event: 'ping', deliveryId, occurredAt: now.toISOString(), model: { id: m.id, name: m.name }, assumption: null };
  await tx.insert(webhookDeliveries).values({ deliveryId, modelId: m.id, event: 'ping', versionId: null, url: m.webhookUrl, body: JSON.stringify(body), nextAttemptAt: now, createdAt: now });
  return deliveryId;
}
