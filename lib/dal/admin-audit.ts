import 'server-only';
import { and, asc, eq, gte, inArray, lte } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { adminAudit, roles, type Role } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';

/** Appends one row to the admin audit log (the table refuses updates and deletes). */
export async function recordAdminAction(
  tx: DbOrTx,
  actor: SessionUser,
  entry: { action: string; targetType: string; targetId: string | number; before?: unknown; after?: unknown },
): Promise<void> {
  await tx.insert(adminAudit).values({
    actorId: actor.id,
    actorEmail: actor.email,
    action: entry.action,
    targetType: entry.targetType,
    targetId: String(entry.targetId),
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}

export type RoleChange = { userId: number; from: Role | null; to: Role | null; byEmail: string; at: Date };

function roleIn(v: unknown): Role | null {
  const r = v && typeof v === 'object' && 'role' in v ? (v as { role: unknown }).role : null;
  return typeof r === 'string' && (roles as readonly string[]).includes(r) ? (r as Role) : null;
}

/** The role changes of these users logged between `from` and `to` (inclusive), oldest first. */
export async function roleChangesOf(db: DbOrTx, userIds: readonly number[], from: Date, to: Date): Promise<RoleChange[]> {
  if (!userIds.length) return [];
  const rows = await db
    .select()
    .from(adminAudit)
    .where(
      and(
        eq(adminAudit.action, 'user.role'),
        eq(adminAudit.targetType, 'user'),
        inArray(adminAudit.targetId, userIds.map(String)),
        gte(adminAudit.at, from),
        lte(adminAudit.at, to),
      ),
    )
    .orderBy(asc(adminAudit.id));
  return rows.map((r) => ({ userId: Number(r.targetId), from: roleIn(r.before), to: roleIn(r.after), byEmail: r.actorEmail, at: r.at }));
}
