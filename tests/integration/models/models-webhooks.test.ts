import { createServer, type IncomingMessage, type Server } from 'node:http';
import { createHmac } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { mailOutbox, webhookCaptured, webhookDeliveries } from '@/db/schema';
import { todayIso } from '@/lib/assumptions/dates';
import { createDraft, transition } from '@/lib/dal/assumptions';
import { modelsUsing } from '@/lib/dal/models';
import { createToken, listTokens } from '@/lib/dal/tokens';
import { backoffMs, MAX_ATTEMPTS } from '@/lib/mail/sender';
import { sendDueWebhooks } from '@/lib/mail/webhook-sender';
import * as modelsRoute from '@/app/api/models/route';
import * as modelRoute from '@/app/api/models/[id]/route';
import * as secretRoute from '@/app/api/models/[id]/secret/route';
import * as receiverRoute from '@/app/api/webhook-receiver/route';
import { makeUser } from '../../support/users';
import { call, draftBody, makeFitRun, type ApiAnswer, type SessionUser } from '../../support/assumptions';

vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
import { session } from '../../support/mock-session';

/**
 * The models that consume a value: the register, the e-mail to each model's contact and the
 * signed webhooks (HMAC-SHA256 over the body with the model's secret, a delivery id, retries with
 * backoff through the outbox), checked against a local HTTP receiver written here with node:http
 * that verifies the signature itself (RFC 2104 HMAC with SHA-256, by node:crypto).
 */
type Received = { headers: IncomingMessage['headers']; body: string; answered: number };
let server: Server;
let port = 0;
const received: Received[] = [];
/** What the receiver answers next (one status per request; 200 once the list is empty). */
const answers: number[] = [];

let analyst: SessionUser;
let validator: SessionUser;
let viewer: SessionUser;
let admin: SessionUser;
const tag = Date.now().toString(36);
const SEG = `Model segment ${tag}`;

async function as(user: SessionUser, fn: () => Promise<ApiAnswer>) {
  session.user = user;
  try {
    return await fn();
  } finally {
    session.user = null;
  }
}

async function publishVersion(comment = 'Checked.') {
  const { fitId } = await makeFitRun(analyst.id, SEG);
  const v = await createDraft(analyst, draftBody(fitId, SEG, { effectiveDate: todayIso() }) as never);
  await transition(analyst, v.id, { action: 'submit' });
  await transition(validator, v.id, { action: 'start-review' });
  await transition(validator, v.id, { action: 'approve', comment });
  await transition(validator, v.id, { action: 'publish' });
  return v;
}

beforeAll(async () => {
  analyst = await makeUser('analyst');
  validator = await makeUser('validator');
  viewer = await makeUser('viewer');
  admin = await makeUser('admin');
  server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      const status = answers.shift() ?? 200;
      received.push({ headers: req.headers, body: Buffer.concat(chunks).toString('utf8'), answered: status });
      res.writeHead(status, { 'content-type': 'text/plain' }).end(status === 200 ? 'ok' : 'not now');
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await closeDb();
});

let modelId = 0;
let secret = '';
let assumptionId = 0;

describe('the register of consuming models', () => {
  it('analysts register a model with the assumptions it uses; the webhook secret is answered once, never again', async () => {
    // The segment's assumption exists once a version is drafted.
    const first = await publishVersion();
    assumptionId = first.assumptionId;
    const body = {
      name: `Economic capital model ${tag}`,
      ownerName: 'Capital modelling team',
      contactEmail: `capital-${tag}@bank.example`,
      intendedUse: 'Economic capital of the retail book; reads the value in force each month end.',
      webhookUrl: `http://127.0.0.1:${port}/hooks/rhobook`,
      assumptionIds: [assumptionId],
    };
    expect((await as(viewer, () => call(modelsRoute.POST, { body }))).status).toBe(403);
    expect((await as(validator, () => call(modelsRoute.POST, { body }))).status).toBe(403);
    const bad = await as(analyst, () => call(modelsRoute.POST, { body: { ...body, webhookUrl: 'ftp://models.example/x' } }));
    expect(bad.status).toBe(422);
    expect(bad.body.field).toBe('webhookUrl');
    const res = await as(analyst, () => call(modelsRoute.POST, { body }));
    expect(res.status).toBe(201);
    secret = res.body.webhookSecret as string;
    expect(secret).toMatch(/^whsec_[A-Za-z0-9_-]{43}$/);
    modelId = (res.body.model as { id: number }).id;
    const again = await as(viewer, () => call(modelRoute.GET, { params: { id: String(modelId) } }));
    expect(again.status).toBe(200);
    expect(again.text).not.toContain(secret);
    expect(again.body).toMatchObject({ hasSecret: true, assumptions: [{ assumptionId, segment: SEG }] });
    expect((await as(analyst, () => call(modelsRoute.POST, { body }))).status).toBe(409);
    // The assumption's page lists the model: the impact of a change.
    expect((await modelsUsing(viewer, assumptionId)).map((m) => m.name)).toEqual([body.name]);
  });

  it('an API token can be tied to the model', async () => {
    const { id } = await createToken(admin, { name: `Capital model token ${tag}`, scopes: ['assumptions:read'], modelId });
    const t = (await listTokens(admin)).find((x) => x.id === id)!;
    expect(t.model).toEqual({ id: modelId, name: `Economic capital model ${tag}` });
    await expect(createToken(admin, { name: 'x', scopes: ['assumptions:read'], modelId: 987_654 })).rejects.toMatchObject({ code: 'invalid:token' });
  });
});

describe('publication tells the model: an e-mail to its contact and a signed webhook, retried with backoff', () => {
  it('delivers once the receiver answers 200, with the same delivery id on every attempt and a signature the receiver can check', async () => {
    received.length = 0;
    const v2 = await publishVersion('Second version checked.');
    const deliveries = await getDb().select().from(webhookDeliveries).where(eq(webhookDeliveries.modelId, modelId));
    const published = deliveries.find((d) => d.event === 'assumption.published' && d.versionId === v2.id)!;
    const superseded = deliveries.find((d) => d.event === 'assumption.superseded')!;
    expect(published).toBeTruthy();
    expect(superseded).toBeTruthy();
    const mails = await getDb().select().from(mailOutbox).where(and(eq(mailOutbox.kind, 'model-notice'), eq(mailOutbox.toAddress, `capital-${tag}@bank.example`)));
    expect(mails.map((m) => m.subject)).toEqual(expect.arrayContaining([`Published for Economic capital model ${tag}: ${SEG} v2 = ${v2.finalValue}`, `Superseded for Economic capital model ${tag}: ${SEG} v1`]));

    // The receiver is down for the first attempt of everything due.
    const t0 = new Date(Date.now() + 1000);
    answers.push(500, 500, 500, 500, 500, 500);
    const first = await sendDueWebhooks(getDb(), t0, { batch: 100 });
    expect(first.retrying).toBeGreaterThanOrEqual(2);
    let [row] = await getDb().select().from(webhookDeliveries).where(eq(webhookDeliveries.id, published.id));
    expect(row).toMatchObject({ status: 'pending', attempts: 1, lastStatus: 500, lastError: 'The receiver answered HTTP 500.' });
    expect(row.nextAttemptAt.getTime()).toBe(t0.getTime() + backoffMs(1));
    // Not due again before the backoff has passed.
    answers.length = 0;
    const early = await sendDueWebhooks(getDb(), new Date(t0.getTime() + backoffMs(1) - 1000), { batch: 100 });
    expect(early.delivered + early.retrying).toBe(0);
    const second = await sendDueWebhooks(getDb(), new Date(t0.getTime() + backoffMs(1) + 1), { batch: 100 });
    expect(second.delivered).toBeGreaterThanOrEqual(2);
    [row] = await getDb().select().from(webhookDeliveries).where(eq(webhookDeliveries.id, published.id));
    expect(row).toMatchObject({ status: 'delivered', attempts: 2, lastStatus: 200 });

    const attempts = received.filter((r) => r.headers['x-rhobook-delivery'] === published.deliveryId);
    expect(attempts.map((a) => a.answered)).toEqual([500, 200]);
    for (const a of attempts) {
      expect(a.headers['content-type']).toBe('application/json');
      expect(a.headers['x-rhobook-event']).toBe('assumption.published');
      const expected = `sha256=${createHmac('sha256', secret).update(a.body, 'utf8').digest('hex')}`;
      expect(a.headers['x-rhobook-signature']).toBe(expected);
      const body = JSON.parse(a.body);
      expect(body).toMatchObject({
        event: 'assumption.published',
        deliveryId: published.deliveryId,
        model: { id: modelId },
        assumption: { assumptionId, segment: SEG, version: 2, status: 'published', value: v2.finalValue, pd: v2.pd },
      });
      expect(body.assumption.api).toMatch(new RegExp(`/api/v1/assumptions/${assumptionId}/versions/2$`));
    }
    const sup = JSON.parse(received.find((r) => r.headers['x-rhobook-delivery'] === superseded.deliveryId && r.answered === 200)!.body);
    expect(sup.assumption).toMatchObject({ version: 1, status: 'superseded', supersededBy: 2 });
  });

  it('retirement is told too; a receiver that never answers makes the delivery fail after the last attempt, listed on the model', async () => {
    const [v2] = await getDb().select().from(webhookDeliveries).where(and(eq(webhookDeliveries.modelId, modelId), eq(webhookDeliveries.event, 'assumption.published'))).orderBy(webhookDeliveries.id);
    // Point the model at a port nobody listens on, then retire the published version.
    await as(analyst, () => call(modelRoute.PATCH, { method: 'PATCH', body: { webhookUrl: 'http://127.0.0.1:1/closed' }, params: { id: String(modelId) } }));
    // The first publication the model heard of is version 2, the one published now.
    await transition(validator, v2.versionId!, { action: 'retire', comment: 'No longer used.' });
    const [retired] = await getDb().select().from(webhookDeliveries).where(and(eq(webhookDeliveries.modelId, modelId), eq(webhookDeliveries.event, 'assumption.retired')));
    expect(retired).toBeTruthy();
    // Deliveries keep the URL they were queued for: this one goes to the closed port.
    expect(retired.url).toBe('http://127.0.0.1:1/closed');
    let t = Date.now() + 1000;
    for (let i = 1; i <= MAX_ATTEMPTS; i++) {
      await sendDueWebhooks(getDb(), new Date(t), { batch: 100, timeoutMs: 2000 });
      t += backoffMs(i) + 1;
    }
    const [after] = await getDb().select().from(webhookDeliveries).where(eq(webhookDeliveries.id, retired.id));
    expect(after.status).toBe('failed');
    expect(after.attempts).toBe(MAX_ATTEMPTS);
    expect(after.lastError).toMatch(/ECONNREFUSED|fetch failed/);
    const page = await as(viewer, () => call(modelRoute.GET, { params: { id: String(modelId) } }));
    const log = page.body.deliveryLog as { deliveryId: string; status: string; event: string }[];
    expect(log.find((d) => d.deliveryId === retired.deliveryId)).toMatchObject({ status: 'failed', event: 'assumption.retired' });
    expect((page.body.deliveries as { failed: number }).failed).toBeGreaterThanOrEqual(1);
  });

  it('a rotated secret is answered once; the local receiver checks signatures with it (200) and refuses others (401)', async () => {
    const rot = await as(analyst, () => call(secretRoute.POST, { params: { id: String(modelId) } }));
    expect(rot.status).toBe(200);
    const fresh = rot.body.webhookSecret as string;
    expect(fresh).not.toBe(secret);
    const body = JSON.stringify({ event: 'ping', deliveryId: `d-${tag}`, occurredAt: new Date().toISOString(), model: { id: modelId, name: 'x' }, assumption: null });
    const sign = (k: string) => `sha256=${createHmac('sha256', k).update(body, 'utf8').digest('hex')}`;
    const send = (signature: string) =>
      call(receiverRoute.POST, { url: 'http://127.0.0.1/api/webhook-receiver', body: JSON.parse(body), headers: { 'x-rhobook-signature': signature, 'x-rhobook-delivery': `d-${tag}`, 'x-rhobook-event': 'ping' } });
    expect((await send(sign(fresh))).status).toBe(200);
    expect((await send(sign(secret))).status).toBe(401);
    const seen = await getDb().select().from(webhookCaptured).where(eq(webhookCaptured.deliveryId, `d-${tag}`));
    expect(seen.map((s) => s.signatureValid).sort()).toEqual([false, true]);
  });
});
