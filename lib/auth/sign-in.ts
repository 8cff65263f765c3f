import { and, eq, gt, or, sql } from 'drizzle-orm';
import type { Db } from '@/db/connection';
import { signInFailures, users, type Role } from '@/db/schema';
import { env } from '@/lib/env';
import { DUMMY_HASH, verifyPassword } from './password';
import { secondsToWait, signInWaitMessage, type FailureGroup } from './throttle';

export { signInWaitMessage } from './throttle';

/** The one sentence shown for a wrong password, an unknown e-mail and a deactivated account alike,
 * so that the answer does not tell an attacker which accounts exist. */
export const SIGN_IN_REFUSED = 'The e-mail or password is not right, or the account is not active.';

export type SignInResult =
  | { ok: true; user: { id: number; email: string; name: string; role: Role; sessionVersion: number; mustChangePassword: boolean } }
  | { ok: false; reason: 'refused'; message: string }
  | { ok: false; reason: 'rate-limited'; message: string; waitSeconds: number };

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

function toDate(v: unknown): Date | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return v;
  return new Date(`${String(v).replace(' ', 'T')}Z`);
}

/** The failures of the window by group: this account from this address, this address, this account. */
async function recentFailures(db: Db, email: string, address: string, since: Date) {
  const f = signInFailures;
  const pair = sql`${f.email} = ${email} AND ${f.clientAddress} = ${address}`;
  const [row] = await db
    .select({
      pairCount: sql`COALESCE(SUM(${pair}), 0)`.mapWith(Number),
      pairLast: sql`MAX(CASE WHEN ${pair} THEN ${f.at} END)`.mapWith(toDate),
      addressCount: sql`COALESCE(SUM(${f.clientAddress} = ${address}), 0)`.mapWith(Number),
      addressLast: sql`MAX(CASE WHEN ${f.clientAddress} = ${address} THEN ${f.at} END)`.mapWith(toDate),
      accountCount: sql`COALESCE(SUM(${f.email} = ${email}), 0)`.mapWith(Number),
      accountLast: sql`MAX(CASE WHEN ${f.email} = ${email} THEN ${f.at} END)`.mapWith(toDate),
    })
    .from(f)
    .where(and(gt(f.at, since), or(eq(f.email, email), eq(f.clientAddress, address))));
  const group = (count: number, last: Date | null): FailureGroup => ({ count, last });
  return {
    pair: group(row.pairCount, row.pairLast),
    address: group(row.addressCount, row.addressLast),
    account: group(row.accountCount, row.accountLast),
  };
}

/**
 * Checks a sign-in attempt: first the throttle (lib/auth/throttle.ts: a wait that grows with the
 * failures of this account from this address, of this address, and of this account), then the
 * password with bcrypt. A wrong password is recorded as a failure; an attempt refused for waiting
 * is not, and a right password clears the failures of this account from this address.
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

  const wait = secondsToWait(await recentFailures(db, email, address, since), {
    free: e.SIGNIN_FREE_FAILURES,
    maxSeconds: e.SIGNIN_MAX_DELAY_SECONDS,
    accountMaxSeconds: e.SIGNIN_ACCOUNT_DELAY_SECONDS,
  }, now);
  if (wait > 0) return { ok: false, reason: 'rate-limited', message: signInWaitMessage(wait), waitSeconds: wait };

  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const passwordOk = await verifyPassword(input.password, user?.passwordHash ?? DUMMY_HASH);
  if (!user || !passwordOk || !user.active) {
    await db.insert(signInFailures).values({ email, clientAddress: address, at: now });
    return { ok: false, reason: 'refused', message: SIGN_IN_REFUSED };
  }
  await db.delete(signInFailures).where(and(eq(signInFailures.email, email), eq(signInFailures.clientAddress, address)));
  return {
    ok: true,
    user: { id: user.id, email: user.email, name: user.name, role: user.role, sessionVersion: user.sessionVersion, mustChangePassword: user.mustChangePassword },
  };
}
