import 'server-only';
import { and, asc, count, desc, eq, inArray } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import type { DbOrTx } from '@/db/connection';
import { isDuplicateKeyError } from '@/db/errors';
import {
  apiTokens,
  assumptions,
  assumptionVersions,
  consumingModelAssumptions,
  consumingModels,
  webhookCaptured,
  webhookDeliveries,
  type ConsumingModel,
  type WebhookStatus,
} from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { can } from '@/lib/auth/permissions';
import { AppError, parseOrThrow } from '@/lib/errors';
import { newWebhookSecret } from '@/lib/mail/webhook-signature';
import { recordAdminAction } from './admin-audit';
import { queuePing } from './model-notify';

/**
 * The register of consuming models: the downstream models (capital, stress test, provisioning,
 * pricing ...) that read published assumptions, who owns them, how to reach them, what they use
 * each value for, and which assumptions each uses. Analysts and administrators keep it; everyone
 * reads it. A model may register a webhook URL: its secret is shown once when it is made and
 * never answered again (rotate it to see a new one). Every change is in the administration log.
 */
export type ModelDto = {
  id: number;
  name: string;
  ownerName: string;
  contactEmail: string;
  intendedUse: string;
  webhookUrl: string | null;
  hasSecret: boolean;
  active: boolean;
  assumptions: { assumptionId: number; segment: string; published: { versionId: number; version: number } | null }[];
  deliveries: { pending: number; failed: number };
  tokens: number;
  createdAt: string;
};

export type DeliveryDto = {
  id: number;
  deliveryId: string;
  event: string;
  versionId: number | null;
  url: string;
  status: WebhookStatus;
  attempts: number;
  lastStatus: number | null;
  lastError: string | null;
  nextAttemptAt: string;
  deliveredAt: string | null;
  createdAt: string;
  /** Seen by the local webhook receiver (while mail is captured locally), with its signature check. */
  received: { at: string; signatureValid: boolean } | null;
};

export type ModelDetailDto = ModelDto & {
  deliveryLog: DeliveryDto[];
  tokenList: { id: number; name: string; prefix: string; revoked: boolean }[];
  mayManage: boolean;
};

const optionalUrl = z
  .string()
  .trim()
  .max(500, 'Keep the webhook URL under 500 characters.')
  .transform((v) => (v ? v : null))
  .refine((v) => {
    if (v === null) return true;
    try {
      const u = new URL(v);
      return (u.protocol === 'https:' || u.protocol === 'http:') && !u.username && !u.password;
    } catch {
      return false;
    }
  }, 'The webhook URL must be an http or https address without a user name or password, for example https://models.example/hooks/rhobook.')
  .nullable()
  .optional();

export const modelInputSchema = z.object({
  name: z.string().trim().min(2, 'Give the model a name of at least 2 characters.').max(160, 'Keep the name under 160 characters.'),
  ownerName: z.string().trim().min(2, "Name the model's owner.").max(120),
  contactEmail: z.string().trim().email('The contact must be an e-mail address.').max(254),
  intendedUse: z.string().trim().min(5, 'Say what the model uses the value for (at least 5 characters).').max(4000),
  webhookUrl: optionalUrl,
  active: z.boolean().optional(),
  assumptionIds: z.array(z.number().int().positive()).max(500).optional(),
});
export type ModelInput = z.input<typeof modelInputSchema>;
export const modelPatchSchema = modelInputSchema.partial();

async function assumptionsOf(db: DbOrTx, modelIds: number[]) {
  if (!modelIds.length) return [];
  const rows = await db
    .select({ modelId: consumingModelAssumptions.modelId, assumptionId: assumptions.id, segment: assumptions.segment })
    .from(consumingModelAssumptions)
    .innerJoin(assumptions, eq(assumptions.id, consumingModelAssumptions.assumptionId))
    .where(inArray(consumingModelAssumptions.modelId, modelIds))
    .orderBy(asc(assumptions.segment));
  const published = rows.length
    ? await db
        .select({ assumptionId: assumptionVersions.assumptionId, id: assumptionVersions.id, version: assumptionVersions.version })
        .from(assumptionVersions)
        .where(and(inArray(assumptionVersions.assumptionId, [...new Set(rows.map((r) => r.assumptionId))]), eq(assumptionVersions.status, 'published')))
    : [];
  return rows.map((r) => {
    const p = published.find((x) => x.assumptionId === r.assumptionId);
    return { ...r, published: p ? { versionId: p.id, version: p.version } : null };
  });
}

async function toDtos(db: DbOrTx, rows: ConsumingModel[]): Promise<ModelDto[]> {
  const ids = rows.map((r) => r.id);
  const used = await assumptionsOf(db, ids);
  const pending = ids.length
    ? await db
        .select({ modelId: webhookDeliveries.modelId, status: webhookDeliveries.status, n: count() })
        .from(webhookDeliveries)
        .where(inArray(webhookDeliveries.modelId, ids))
        .groupBy(webhookDeliveries.modelId, webhookDeliveries.status)
    : [];
  const tokens = ids.length
    ? await db.select({ modelId: apiTokens.modelId, n: count() }).from(apiTokens).where(inArray(apiTokens.modelId, ids)).groupBy(apiTokens.modelId)
    : [];
  return rows.map((m) => ({
    id: m.id,
    name: m.name,
    ownerName: m.ownerName,
    contactEmail: m.contactEmail,
    intendedUse: m.intendedUse,
    webhookUrl: m.webhookUrl,
    hasSecret: !!m.webhookSecret,
    active: m.active,
    assumptions: used.filter((u) => u.modelId === m.id).map(({ modelId: _, ...rest }) => rest),
    deliveries: {
      pending: Number(pending.find((p) => p.modelId === m.id && p.status === 'pending')?.n ?? 0),
      failed: Number(pending.find((p) => p.modelId === m.id && p.status === 'failed')?.n ?? 0),
    },
    tokens: Number(tokens.find((t) => t.modelId === m.id)?.n ?? 0),
    createdAt: m.createdAt.toISOString(),
  }));
}

export async function listModels(actor: SessionUser): Promise<ModelDto[]> {
  assertCan(actor, 'models:read');
  const db = getDb();
  return toDtos(db, await db.select().from(consumingModels).orderBy(asc(consumingModels.name)));
}

export async function getModel(actor: SessionUser, id: number): Promise<ModelDetailDto> {
  assertCan(actor, 'models:read');
  const db = getDb();
  const [m] = await db.select().from(consumingModels).where(eq(consumingModels.id, id));
  if (!m) throw new AppError('not_found:model', 'There is no such model.');
  const [dto] = await toDtos(db, [m]);
  const log = await db.select().from(webhookDeliveries).where(eq(webhookDeliveries.modelId, id)).orderBy(desc(webhookDeliveries.id)).limit(100);
  const seen = log.length
    ? await db
        .select({ deliveryId: webhookCaptured.deliveryId, at: webhookCaptured.receivedAt, valid: webhookCaptured.signatureValid })
        .from(webhookCaptured)
        .where(inArray(webhookCaptured.deliveryId, log.map((d) => d.deliveryId)))
    : [];
  const tokenList = await db
    .select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .where(eq(apiTokens.modelId, id))
    .orderBy(desc(apiTokens.id));
  return {
    ...dto,
    deliveryLog: log.map((d) => {
      const r = seen.filter((s) => s.deliveryId === d.deliveryId).sort((a, b) => b.at.getTime() - a.at.getTime())[0];
      return {
        id: d.id,
        deliveryId: d.deliveryId,
        event: d.event,
        versionId: d.versionId,
        url: d.url,
        status: d.status,
        attempts: d.attempts,
        lastStatus: d.lastStatus,
        lastError: d.lastError,
        nextAttemptAt: d.nextAttemptAt.toISOString(),
        deliveredAt: d.deliveredAt?.toISOString() ?? null,
        createdAt: d.createdAt.toISOString(),
        received: r ? { at: r.at.toISOString(), signatureValid: r.valid } : null,
      };
    }),
    tokenList: tokenList.map((t) => ({ id: t.id, name: t.name, prefix: t.prefix, revoked: !!t.revokedAt })),
    mayManage: can(actor.role, 'models:manage'),
  };
}

/** The models that use an assumption: the impact of a change, shown on the assumption's page. */
export async function modelsUsing(actor: SessionUser, assumptionId: number): Promise<{ id: number; name: string; ownerName: string; intendedUse: string; webhook: boolean; active: boolean }[]> {
  assertCan(actor, 'models:read');
  return (
    await getDb()
      .select({ m: consumingModels })
      .from(consumingModelAssumptions)
      .innerJoin(consumingModels, eq(consumingModels.id, consumingModelAssumptions.modelId))
      .where(eq(consumingModelAssumptions.assumptionId, assumptionId))
      .orderBy(asc(consumingModels.name))
  ).map(({ m }) => ({ id: m.id, name: m.name, ownerName: m.ownerName, intendedUse: m.intendedUse, webhook: !!m.webhookUrl, active: m.active }));
}

/** The segments a model can use: every assumption (with or without a published version). */
export async function listAssumptionChoices(actor: SessionUser): Promise<{ id: number; segment: string }[]> {
  assertCan(actor, 'models:read');
  return getDb().select({ id: assumptions.id, segment: assumptions.segment }).from(assumptions).orderBy(asc(assumptions.segment));
}

async function setAssumptions(tx: DbOrTx, actor: SessionUser, modelId: number, ids: number[]): Promise<void> {
  const unique = [...new Set(ids)];
  if (unique.length) {
    const known = await tx.select({ id: assumptions.id }).from(assumptions).where(inArray(assumptions.id, unique));
    const missing = unique.filter((i) => !known.some((k) => k.id === i));
    if (missing.length) throw new AppError('invalid:model', `There is no assumption ${missing.join(', ')}.`, { field: 'assumptionIds' });
  }
  await tx.delete(consumingModelAssumptions).where(eq(consumingModelAssumptions.modelId, modelId));
  if (unique.length) await tx.insert(consumingModelAssumptions).values(unique.map((assumptionId) => ({ modelId, assumptionId, addedBy: actor.id })));
}

function nameTaken(name: string): AppError {
  return new AppError('conflict:model-name', `A model named “${name}” is already registered.`, { field: 'name' });
}

/** Registers a model; the webhook secret (when a URL is given) is returned this once. */
export async function createModel(actor: SessionUser, input: ModelInput): Promise<{ model: ModelDetailDto; webhookSecret: string | null }> {
  assertCan(actor, 'models:manage', 'Only analysts and administrators keep the register of models.');
  const v = parseOrThrow(modelInputSchema, input, 'invalid:model', 'The model is not valid.');
  const secret = v.webhookUrl ? newWebhookSecret() : null;
  let id = 0;
  try {
    await getDb().transaction(async (tx) => {
      const [res] = await tx.insert(consumingModels).values({
        name: v.name,
        ownerName: v.ownerName,
        contactEmail: v.contactEmail,
        intendedUse: v.intendedUse,
        webhookUrl: v.webhookUrl ?? null,
        webhookSecret: secret,
        active: v.active ?? true,
        createdBy: actor.id,
      });
      id = Number(res.insertId);
      await setAssumptions(tx, actor, id, v.assumptionIds ?? []);
      await recordAdminAction(tx, actor, { action: 'model.create', targetType: 'model', targetId: id, after: { name: v.name, webhookUrl: v.webhookUrl ?? null, assumptionIds: v.assumptionIds ?? [] } });
    });
  } catch (err) {
    if (isDuplicateKeyError(err)) throw nameTaken(v.name);
    throw err;
  }
  return { model: await getModel(actor, id), webhookSecret: secret };
}

/** Changes a model; a webhook URL set for the first time gets a secret, returned this once. */
export async function updateModel(actor: SessionUser, id: number, input: z.input<typeof modelPatchSchema>): Promise<{ model: ModelDetailDto; webhookSecret: string | null }> {
  assertCan(actor, 'models:manage', 'Only analysts and administrators keep the register of models.');
  const v = parseOrThrow(modelPatchSchema, input, 'invalid:model', 'The change is not valid.');
  let secret: string | null = null;
  try {
    await getDb().transaction(async (tx) => {
      const [m] = await tx.select().from(consumingModels).where(eq(consumingModels.id, id)).for('update');
      if (!m) throw new AppError('not_found:model', 'There is no such model.');
      const set: Partial<typeof consumingModels.$inferInsert> = { updatedAt: new Date() };
      for (const k of ['name', 'ownerName', 'contactEmail', 'intendedUse', 'active'] as const) if (v[k] !== undefined) (set as Record<string, unknown>)[k] = v[k];
      if (v.webhookUrl !== undefined) {
        set.webhookUrl = v.webhookUrl;
        if (v.webhookUrl && !m.webhookSecret) secret = set.webhookSecret = newWebhookSecret();
        if (!v.webhookUrl) set.webhookSecret = null;
      }
      await tx.update(consumingModels).set(set).where(eq(consumingModels.id, id));
      if (v.assumptionIds) await setAssumptions(tx, actor, id, v.assumptionIds);
      await recordAdminAction(tx, actor, {
        action: 'model.update',
        targetType: 'model',
        targetId: id,
        before: { name: m.name, webhookUrl: m.webhookUrl, active: m.active },
        after: { ...v, webhookSecret: undefined },
      });
    });
  } catch (err) {
    if (isDuplicateKeyError(err)) throw nameTaken(v.name ?? '');
    throw err;
  }
  return { model: await getModel(actor, id), webhookSecret: secret };
}

/** A new webhook secret, returned this once; deliveries still to be sent are signed with it. */
export async function rotateWebhookSecret(actor: SessionUser, id: number): Promise<{ webhookSecret: string }> {
  assertCan(actor, 'models:manage', 'Only analysts and administrators keep the register of models.');
  const secret = newWebhookSecret();
  await getDb().transaction(async (tx) => {
    const [m] = await tx.select().from(consumingModels).where(eq(consumingModels.id, id)).for('update');
    if (!m) throw new AppError('not_found:model', 'There is no such model.');
    if (!m.webhookUrl) throw new AppError('conflict:model-webhook', 'This model has no webhook URL: set one first.');
    await tx.update(consumingModels).set({ webhookSecret: secret, updatedAt: new Date() }).where(eq(consumingModels.id, id));
    await recordAdminAction(tx, actor, { action: 'model.secret', targetType: 'model', targetId: id });
  });
  return { webhookSecret: secret };
}

/** Queues a test event to the model's webhook. */
export async function pingModel(actor: SessionUser, id: number, now: Date = new Date()): Promise<{ deliveryId: string }> {
  assertCan(actor, 'models:manage', 'Only analysts and administrators keep the register of models.');
  return getDb().transaction(async (tx) => {
    const [m] = await tx.select().from(consumingModels).where(eq(consumingModels.id, id));
    if (!m) throw new AppError('not_found:model', 'There is no such model.');
    if (!m.webhookUrl) throw new AppError('conflict:model-webhook', 'This model has no webhook URL: set one first.');
    return { deliveryId: await queuePing(tx, { id: m.id, name: m.name, webhookUrl: m.webhookUrl }, now) };
  });
}

/** Models for the token form (administrators tie a token to a model). */
export async function listModelChoices(actor: SessionUser): Promise<{ id: number; name: string }[]> {
  assertCan(actor, 'models:read');
  return getDb().select({ id: consumingModels.id, name: consumingModels.name }).from(consumingModels).orderBy(asc(consumingModels.name));
}
