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

type SessionState = { user: SessionUser; mustChangePassword: boolean } | null;

/**
 * The signed-in person, reloaded from the database on every request (once per request thanks to
 * React's cache): a deactivated account or a changed role takes effect on the next request, and a
 * session issued under an older session version (the person signed out, or their password changed)
 * counts as no session at all.
 */
const currentSession = cache(async (): Promise<SessionState> => {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  const [row] = await getDb()
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      role: users.role,
      active: users.active,
      sessionVersion: users.sessionVersion,
      mustChangePassword: users.mustChangePassword,
    })
    .from(users)
    .where(eq(users.id, id))
    .limit(1);
  if (!row || !row.active || session.user.sessionVersion !== row.sessionVersion) return null;
  return { user: { id: row.id, email: row.email, name: row.name, role: row.role }, mustChangePassword: row.mustChangePassword };
});

/** The current user, or null (signed out, deactivated, or a session that was ended). */
export async function getCurrentUser(): Promise<SessionUser | null> {
  return (await currentSession())?.user ?? null;
}

/** Whether the current user signed in with a one-time password they have not replaced yet. */
export async function mustChangePassword(): Promise<boolean> {
  return (await currentSession())?.mustChangePassword ?? false;
}

/**
 * The current user, for everything but changing one's own password: a person who signed in with
 * an invitation's one-time password gets 403 until they have chosen their own.
 */
export async function requireUser(): Promise<SessionUser> {
  const state = await currentSession();
  if (!state) throw new AppError('unauthorized:session', 'Sign in to continue.');
  if (state.mustChangePassword) {
    throw new AppError(
      'forbidden:password-change',
      'You signed in with a one-time password: choose your own password on your account page (/account) before anything else.',
    );
  }
  return state.user;
}

/** The current user, also while a one-time password still has to be changed (the account page and its action). */
export async function requireSignedIn(): Promise<SessionUser> {
  const state = await currentSession();
  if (!state) throw new AppError('unauthorized:session', 'Sign in to continue.');
  return state.user;
}
