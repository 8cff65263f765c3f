import 'server-only';
import { asc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '@/db/client';
import type { DbOrTx } from '@/db/connection';
import { overduePolicyChanges, overduePolicyKinds, users, type OverduePolicy } from '@/db/schema';
import { DEFAULT_OVERDUE_POLICY, overduePolicyAt } from '@/lib/assumptions/overdue-policy';
import { assertCan, type SessionUser } from '@/lib/auth/guard';
import { AppError, parseOrThrow } from '@/lib/errors';
import { recordAdminAction } from './admin-audit';
import { prepared } from './prepared';

/**
 * The overdue policy (lib/assumptions/overdue-policy.ts): administrators set it, with a reason;
 * every change is kept with its time (append-only), so that the consumer API's answer for a past
 * date reads the policy of then. Everyone may read it.
 */
export type OverduePolicyDto = {
  current: OverduePolicy;
  isDefault: boolean;
  history: { policy: OverduePolicy; reason: string; by: string; at: string }[];
};

/** Every change, oldest first (for overduePolicyAt). */
export async function policyChanges(db: DbOrTx): Promise<{ policy: OverduePolicy; at: Date }[]> {
  return prepared(db, 'policy-changes', () =>
    db.select({ policy: overduePolicyChanges.policy, at: overduePolicyChanges.at }).from(overduePolicyChanges).orderBy(asc(overduePolicyChanges.id)).prepare(),
  ).execute();
}

/** The policy in force at `at` (default now). */
export async function overduePolicyIn(db: DbOrTx, at: Date = new Date()): Promise<OverduePolicy> {
  return overduePolicyAt(await policyChanges(db), at);
}

export async function getOverduePolicy(actor: SessionUser, now: Date = new Date()): Promise<OverduePolicyDto> {
  assertCan(actor, 'assumptions:read');
  const rows = await getDb()
    .select({ c: overduePolicyChanges, by: users.email })
    .from(overduePolicyChanges)
    .innerJoin(users, eq(users.id, overduePolicyChanges.changedBy))
    .orderBy(asc(overduePolicyChanges.id));
  const current = overduePolicyAt(
    rows.map((r) => r.c),
    now,
  );
  return {
    current,
    isDefault: rows.length === 0,
    history: rows.map((r) => ({ policy: r.c.policy, reason: r.c.reason, by: r.by, at: r.c.at.toISOString() })),
  };
}

export const overduePolicyInputSchema = z.object({
  policy: z.enum(overduePolicyKinds, { message: 'Choose flag (keep readable, flagged overdue) or withdraw.' }),
  reason: z.string().trim().min(10, 'Give the reason for the change (at least 10 characters): it is kept with the policy.').max(2000),
});

/** Sets the policy (administrators), from now on; the change and its reason are kept and logged. */
export async function setOverduePolicy(actor: SessionUser, input: z.input<typeof overduePolicyInputSchema>, now: Date = new Date()): Promise<OverduePolicyDto> {
  assertCan(actor, 'settings:manage', 'Only administrators set the overdue policy.');
  const v = parseOrThrow(overduePolicyInputSchema, input, 'invalid:overdue-policy', 'The policy is not valid.');
  await getDb().transaction(async (tx) => {
    const before = await overduePolicyIn(tx, now);
    if (before === v.policy) throw new AppError('conflict:overdue-policy', `The overdue policy is already “${v.policy}”.`);
    await tx.insert(overduePolicyChanges).values({ policy: v.policy, changedBy: actor.id, reason: v.reason, at: now });
    await recordAdminAction(tx, actor, { action: 'policy.overdue', targetType: 'setting', targetId: 'overdue-policy', before: { policy: before }, after: { policy: v.policy, reason: v.reason } });
  });
  return getOverduePolicy(actor, now);
}

export { DEFAULT_OVERDUE_POLICY };
