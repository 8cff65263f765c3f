import 'server-only';
import { eq } from 'drizzle-orm';
import { getDb } from '@/db/client';
import { consumingModels, webhookCaptured } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { DELIVERY_HEADER, EVENT_HEADER, SIGNATURE_HEADER, verifySignature } from '@/lib/mail/webhook-signature';
import { mailIsCaptured } from './outbox';

/**
 * The local webhook receiver, for the demo and for development: while mail is captured locally (no
 * SMTP_URL), the app itself receives the webhooks of models registered with its own URL
 * (/api/webhook-receiver), checks each signature with the model's secret as a real receiver would,
 * and keeps what it received, shown beside each delivery on the model's page. With a real mail
 * server configured it does not exist (404). It needs no session: the signature is the check.
 */
export async function receiveWebhook(body: string, headers: Headers): Promise<{ received: true; deliveryId: string | null }> {
  if (!mailIsCaptured()) throw new AppError('not_found:receiver', 'There is no local webhook receiver while mail goes through an SMTP server.');
  let modelId: number | null = null;
  try {
    const parsed = JSON.parse(body) as { model?: { id?: unknown } };
    modelId = typeof parsed.model?.id === 'number' ? parsed.model.id : null;
  } catch {
    throw new AppError('bad_request:json', 'The webhook body is not valid JSON.');
  }
  const [m] = modelId ? await getDb().select({ secret: consumingModels.webhookSecret }).from(consumingModels).where(eq(consumingModels.id, modelId)) : [];
  const valid = !!m?.secret && verifySignature(m.secret, body, headers.get(SIGNATURE_HEADER));
  const deliveryId = headers.get(DELIVERY_HEADER)?.slice(0, 36) ?? null;
  await getDb()
    .insert(webhookCaptured)
    .values({ deliveryId, modelId, event: headers.get(EVENT_HEADER)?.slice(0, 40) ?? null, signatureValid: valid, body });
  if (!valid) throw new AppError('unauthorized:signature', 'The signature does not match the body under the model’s webhook secret.');
  return { received: true, deliveryId };
}
