import { eq, sql } from 'drizzle-orm';
import type { DbOrTx } from '@/db/connection';
import { users } from '@/db/schema';

/**
 * Ends every session of a user on the server: raises users.session_version, so that each session
 * cookie issued before (it carries the version it was issued under) is refused on its next request
 * by lib/auth/session.ts. Used when the person signs out and when their password changes.
 */
export async function endSessions(db: DbOrTx, userId: number): Promise<void> {
  await db
    .update(users)
    .set({ sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: sql`CURRENT_TIMESTAMP(3)` })
    .where(eq(users.id, userId));
}
