import 'server-only';
import type { Db } from '@/db/connection';
import { adminAudit } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';

type Tx = Pick<Db, 'insert'>;

/** Appends one row to the admin audit log (the table refuses updates and deletes). */
export async function recordAdminAction(
  tx: Tx,
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
