import 'server-only';
import { createHash, randomBytes, timingSafeEqual } from 'node:crypto';
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import { apiTokens, consumingModels, users } from '@/db/schema';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';
import { recordAdminAction } from './admin-audit';
import { changeStampSql } from './change-stamp';
import { prepared } from './prepared';

/**
 * API tokens for downstream models (the consumer API under /api/v1). An administrator creates a
 * token; its secret is shown once and only its SHA-256 is stored (a token has 192 random bits, so a
 * fast hash is enough: there is nothing to guess). Tokens carry scopes, can expire, are revoked by
 * an administrator, and record when they were last used.
 */
export const tokenScopes = ['assumptions:read', 'assumptions:export'] as const;
export type TokenScope = (typeof tokenScopes)[number];

/**
 * A token that was let in. `stamp` is the consumer API's change stamp (./change-stamp.ts), read in
 * the token's own statement so that a kept answer costs one round trip to the database.
 */
export type ApiPrincipal = { kind: 'token'; tokenId: number; name: string; scopes: TokenScope[]; modelId: number | null; stamp?: string };

export type TokenDto = {
  id: number;
  name: string;
  prefix: string;
  scopes: TokenScope[];
  createdBy: string;
  createdAt: string;
  expiresAt: string | null;
  lastUsedAt: string | null;
  revokedAt: string | null;
  status: 'active' | 'revoked' | 'expired';
  /** The consuming model the token is for. */
  model: { id: number; name: string } | null;
};

const TOKEN_PREFIX = 'rhb_';

export function hashToken(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex');
}

export const createTokenSchema = z.object({
  name: z.string().trim().min(1, 'Give the token a name that says who uses it.').max(120),
  scopes: z
    .array(z.enum(tokenScopes, { message: `Scopes are ${tokenScopes.join(' and ')}.` }))
    .min(1, 'Choose at least one scope.'),
  expiresInDays: z.number().int().min(1, 'A token lasts at least one day.').max(730, 'A token lasts at most 730 days.').nullable().optional(),
  /** The consuming model the token is for (lib/dal/models.ts). */
  modelId: z.number().int().positive('Choose the model from the list.').nullable().optional(),
});
export type CreateTokenInput = z.input<typeof createTokenSchema>;

function scopesOf(v: unknown): TokenScope[] {
  const parsed = z.array(z.enum(tokenScopes)).safeParse(v);
  return parsed.success ? parsed.data : [];
}

export async function listTokens(actor: SessionUser, now: Date = new Date()): Promise<TokenDto[]> {
  assertCan(actor, 'tokens:manage', 'Only administrators manage API tokens.');
  const rows = await getDb()
    .select({ t: apiTokens, by: users.email, modelName: consumingModels.name })
    .from(apiTokens)
    .leftJoin(users, eq(users.id, apiTokens.createdBy))
    .leftJoin(consumingModels, eq(consumingModels.id, apiTokens.modelId))
    .orderBy(desc(apiTokens.id));
  return rows.map(({ t, by, modelName }) => ({
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    scopes: scopesOf(t.scopes),
    createdBy: by ?? '',
    createdAt: t.createdAt.toISOString(),
    expiresAt: t.expiresAt?.toISOString() ?? null,
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
    status: t.revokedAt ? 'revoked' : t.expiresAt && t.expiresAt <= now ? 'expired' : 'active',
    model: t.modelId !== null && modelName ? { id: t.modelId, name: modelName } : null,
  }));
}

/** Creates a token and returns its secret once; only the hash is kept. */
export async function createToken(actor: SessionUser, input: CreateTokenInput): Promise<{ token: string; id: number; prefix: string }> {
  assertCan(actor, 'tokens:manage', 'Only administrators create API tokens.');
  const v = parseOrThrow(createTokenSchema, input, 'invalid:token', 'The token details are not valid.');
  const secret = TOKEN_PREFIX + randomBytes(24).toString('base64url');
  const prefix = secret.slice(0, 12);
  const expiresAt = v.expiresInDays ? new Date(Date.now() + v.expiresInDays * 86_400_000) : null;
  return getDb().transaction(async (tx) => {
    if (v.modelId) {
      const [m] = await tx.select({ id: consumingModels.id }).from(consumingModels).where(eq(consumingModels.id, v.modelId));
      if (!m) throw new AppError('invalid:token', `There is no model ${v.modelId}.`, { field: 'modelId' });
    }
    const [res] = await tx.insert(apiTokens).values({
      modelId: v.modelId ?? null,
      name: v.name,
      prefix,
      tokenHash: hashToken(secret),
      scopes: [...new Set(v.scopes)],
      createdBy: actor.id,
      expiresAt,
    });
    await recordAdminAction(tx, actor, {
      action: 'token.create',
      targetType: 'api_token',
      targetId: res.insertId,
      after: { name: v.name, prefix, scopes: v.scopes, expiresAt: expiresAt?.toISOString() ?? null, modelId: v.modelId ?? null },
    });
    return { token: secret, id: res.insertId, prefix };
  });
}

export async function revokeToken(actor: SessionUser, id: number): Promise<void> {
  assertCan(actor, 'tokens:manage', 'Only administrators revoke API tokens.');
  await getDb().transaction(async (tx) => {
    const [t] = await tx.select().from(apiTokens).where(eq(apiTokens.id, id)).for('update');
    if (!t) throw new AppError('not_found:token', 'There is no such API token.');
    if (t.revokedAt) return;
    await tx.update(apiTokens).set({ revokedAt: sql`CURRENT_TIMESTAMP(3)`, revokedBy: actor.id }).where(eq(apiTokens.id, id));
    await recordAdminAction(tx, actor, { action: 'token.revoke', targetType: 'api_token', targetId: id, before: { name: t.name, prefix: t.prefix } });
  });
}

const REFUSED = 'The API token is missing, unknown, expired or revoked. Send it as "Authorization: Bearer <token>"; ask an administrator for a new one.';

/** How finely a token's last use is recorded (the admin screen shows the day). */
export const LAST_USE_RESOLUTION_MS = 60_000;

/**
 * Authenticates an `Authorization: Bearer` header and checks the scope. Records the last use (to
 * the minute).
 * Every refusal is the same 401 sentence (an unknown token and a revoked one look alike), except a
 * valid token without the scope, which is 403.
 */
export async function authenticateToken(authorization: string | null, scope: TokenScope, now: Date = new Date()): Promise<ApiPrincipal> {
  const m = /^Bearer\s+(\S+)\s*$/i.exec(authorization ?? '');
  if (!m || !m[1].startsWith(TOKEN_PREFIX)) throw new AppError('unauthorized:token', REFUSED);
  const hash = hashToken(m[1]);
  const db = getDb();
  const [found] = await prepared(db, 'token-by-hash', () =>
    db
      .select({ t: apiTokens, stamp: changeStampSql })
      .from(apiTokens)
      .where(and(eq(apiTokens.tokenHash, sql.placeholder('hash')), isNull(apiTokens.revokedAt)))
      .limit(1)
      .prepare(),
  ).execute({ hash });
  const t = found?.t;
  if (!t || !timingSafeEqual(Buffer.from(t.tokenHash), Buffer.from(hash)) || (t.expiresAt && t.expiresAt <= now)) {
    throw new AppError('unauthorized:token', REFUSED);
  }
  const scopes = scopesOf(t.scopes);
  if (!scopes.includes(scope)) {
    throw new AppError('forbidden:token-scope', `This API token does not carry the scope ${scope}; ask an administrator for a token that does.`);
  }
  // The last use to the minute: a write (and its flush) on every read would cost more than the read.
  if (!t.lastUsedAt || now.getTime() - t.lastUsedAt.getTime() >= LAST_USE_RESOLUTION_MS) {
    await db.update(apiTokens).set({ lastUsedAt: now }).where(eq(apiTokens.id, t.id));
  }
  return { kind: 'token', tokenId: t.id, name: t.name, scopes, modelId: t.modelId, stamp: found.stamp };
}
