import 'server-only';
import { eq } from 'drizzle-orm';
import { getServerSession } from 'next-auth';
import { cache } from 'react';
import { getDb } from '@/db/client';
import { users } from '@/db/schema';
import { AppError } from '@/lib/errors';
import { authOptions } from './options';
import type { SessionUser } from './guard';

export { assertCan, type SessionUser } from './guard';

/**
 * The current user, reloaded from the database on every request (once per request thanks to
 * React's cache): a deactivated account or a changed role takes effect on the next request.
 */
export const getCurrentUser = cache(async (): Promise<SessionUser | null> => {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  const [row] = await getDb()
    .select({ id: users.id, email: users.email, name: users.name, role: users.role, active: users.active })
    .from(users)
    .where(eq(users.id, id))
    .limit(1);
  if (!row || !row.active) return null;
  return { id: row.id, email: row.email, name: row.name, role: row.role };
});

export async function requireUser(): Promise<SessionUser> {
  const user = await getCurrentUser();
  if (!user) throw new AppError('unauthorized:session', 'Sign in to continue.');
  return user;
}
