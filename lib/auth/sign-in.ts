import { and, count, eq, gt } from 'drizzle-orm';
import type { Db } from '@/db/connection';
import { signInFailures, users, type Role } from '@/db/schema';
import { env } from '@/lib/env';
import { DUMMY_HASH, verifyPassword } from './password';

/** The one sentence shown for a wrong password, an unknown e-mail and a deactivated account alike,
 * so that the answer does not tell an attacker which accounts exist. */
export const SIGN_IN_REFUSED = 'The e-mail or password is not right, or the account is not active.';
export const SIGN_IN_RATE_LIMITED =
  'Too many failed sign-ins for this e-mail or from this address. Wait a few minutes and try again.';

export type SignInResult =
  | { ok: true; user: { id: number; email: string; name: string; role: Role } }
  | { ok: false; reason: 'refused' | 'rate-limited'; message: string };

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

/**
 * Checks a sign-in attempt: the rate limit first (failures per e-mail and per client address
 * within the window), then the password with bcrypt. Records a failure when refused.
 */
export async function attemptSignIn(
  db: Db,
  input: { email: string; password: string; clientAddress: string },
  now: Date = new Date(),
): Promise<SignInResult> {
  const e = env();
  const email = normaliseEmail(input.email).slice(0, 254);
  const address = (input.clientAddress || 'unknown').slice(0, 64);
  const since = new Date(now.getTime() - e.SIGNIN_WINDOW_MINUTES * 60_000);
  const perAddressMax = e.SIGNIN_MAX_FAILURES * 5;

  const [[byEmail], [byAddress]] = await Promise.all([
    db.select({ n: count() }).from(signInFailures).where(and(eq(signInFailures.email, email), gt(signInFailures.at, since))),
    db
      .select({ n: count() })
      .from(signInFailures)
      .where(and(eq(signInFailures.clientAddress, address), gt(signInFailures.at, since))),
  ]);
  if (byEmail.n >= e.SIGNIN_MAX_FAILURES || byAddress.n >= perAddressMax) {
    await db.insert(signInFailures).values({ email, clientAddress: address, at: now });
    return { ok: false, reason: 'rate-limited', message: SIGN_IN_RATE_LIMITED };
  }

  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const passwordOk = await verifyPassword(input.password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !passwordOk || !user.active) {
    await db.insert(signInFailures).values({ email, clientAddress: address, at: now });
    return { ok: false, reason: 'refused', message: SIGN_IN_REFUSED };
  }
  return { ok: true, user: { id: user.id, email: user.email, name: user.name, role: user.role } };
}
