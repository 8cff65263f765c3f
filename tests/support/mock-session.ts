/**
 * A stand-in for lib/auth/session.ts in integration tests that call route handlers directly: the
 * handlers run for real against MariaDB, only next-auth's session lookup is replaced by the user a
 * test signs in as. Use:
 *
 *   vi.mock('@/lib/auth/session', () => import('../../support/mock-session'));
 *   import { session } from '../../support/mock-session';
 *   session.user = await makeUser('analyst');
 */
import type { SessionUser } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';

export { assertCan, type SessionUser } from '@/lib/auth/guard';

export const session: { user: SessionUser | null } = { user: null };

export async function getCurrentUser(): Promise<SessionUser | null> {
  return session.user;
}

export async function requireUser(): Promise<SessionUser> {
  if (!session.user) throw new AppError('unauthorized:session', 'Sign in to continue.');
  return session.user;
}
