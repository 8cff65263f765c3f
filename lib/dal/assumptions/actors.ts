import 'server-only';
import { and, eq, inArray } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { assumptionAudit, type AssumptionStatus, type AssumptionVersion, type Role } from '@/db/schema';
import type { SessionUser } from '@/lib/auth/guard';

/** Who acted on a version: a person, or the scheduler. */
export type Actor = { id: number | null; email: string; role: Role | 'system'; name: string };

export const SYSTEM: Actor = { id: null, email: 'system', role: 'system', name: 'Rhobook scheduler' };

export function asActor(u: SessionUser): Actor {
  return { id: u.id, email: u.email, role: u.role, name: u.name };
}

/** The drafter and everyone who edited the version (from the audit trail, which cannot be altered). */
export async function makerIds(db: DbOrTx, v: AssumptionVersion): Promise<number[]> {
  const rows = await db
    .selectDistinct({ id: assumptionAudit.actorId })
    .from(assumptionAudit)
    .where(and(eq(assumptionAudit.versionId, v.id), inArray(assumptionAudit.action, ['draft', 'edit'])));
  return [...new Set([v.authorId, ...(v.lastEditedBy ? [v.lastEditedBy] : []), ...rows.map((r) => r.id).filter((x): x is number => x !== null)])];
}

/** What every audit row of a value says of an event, whatever the kind of value (a segment's version or a matrix's). */
export function auditEventFields(actor: Actor, e: { action: string; from: AssumptionStatus | null; to: AssumptionStatus; comment?: string | null }, contentHash: string, at: Date) {
  return {
    action: e.action,
    actorId: actor.id,
    actorEmail: actor.email,
    actorRole: actor.role,
    fromStatus: e.from,
    toStatus: e.to,
    comment: e.comment?.trim() || null,
    contentHash,
    at,
  };
}
