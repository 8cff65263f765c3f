/**
 * Sessions end on the server: signing out and changing the password raise the account's session
 * version, and a session cookie issued under an older one is refused on its next request. A person
 * who signed in with an invitation's one-time password can do nothing but change it.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { users } from '@/db/schema';
import { changeOwnPassword } from '@/lib/dal/users';
import { call } from '../../support/assumptions';
import { makeUser } from '../../support/users';

// next-auth's cookie decoding is replaced by the session a test holds; everything after it (the
// session version check, the one-time password rule, the route handlers) runs for real.
const held: { session: { user: { id: number; role: string; sessionVersion: number } } | null } = { session: null };
vi.mock('next-auth', async (importOriginal) => ({
  ...(await importOriginal<typeof import('next-auth')>()),
  getServerSession: async () => held.session,
}));

const { getCurrentUser, requireSignedIn, requireUser } = await import('@/lib/auth/session');
const { authOptions } = await import('@/lib/auth/options');
const libraryRoute = await import('@/app/api/assumptions/route');

async function versionOf(id: number) {
  return (await getDb().select({ v: users.sessionVersion }).from(users).where(eq(users.id, id)))[0].v;
}

/** The session a browser holds after signing in now: the cookie carries the account's current version. */
async function signIn(user: { id: number; role: string }) {
  return { user: { id: user.id, role: user.role, sessionVersion: await versionOf(user.id) } };
}

beforeEach(() => {
  held.session = null;
});
afterAll(async () => {
  await closeDb();
});

describe('a session ends on the server', () => {
  it('after signing out, the same cookie (kept elsewhere) is refused: no user, 401 from the API', async () => {
    const me = await makeUser('analyst');
    const cookie = await signIn(me);
    held.session = cookie;
    expect((await getCurrentUser())?.id).toBe(me.id);
    expect((await call(libraryRoute.GET)).status).toBe(200);

    // What next-auth calls when the person presses "Sign out".
    await authOptions.events!.signOut!({ token: { uid: me.id }, session: null } as never);

    held.session = cookie;
    expect(await getCurrentUser()).toBeNull();
    await expect(requireUser()).rejects.toMatchObject({ code: 'unauthorized:session', status: 401 });
    const answer = await call(libraryRoute.GET);
    expect(answer.status).toBe(401);
    expect(answer.body.message).toBe('Sign in to continue.');
    // Signing in again gives a cookie of the new version, which works.
    held.session = await signIn(me);
    expect((await getCurrentUser())?.id).toBe(me.id);
  });

  it('after a password change, every earlier session of the account is refused', async () => {
    const me = await makeUser('validator', { password: 'first password 1' });
    const laptop = await signIn(me);
    const phone = await signIn(me);
    await changeOwnPassword(me, { currentPassword: 'first password 1', newPassword: 'second password 2' });
    for (const cookie of [laptop, phone]) {
      held.session = cookie;
      expect(await getCurrentUser()).toBeNull();
    }
    held.session = await signIn(me);
    expect((await getCurrentUser())?.id).toBe(me.id);
  });

  it('a cookie from before session versions existed (no version in it) is refused', async () => {
    const me = await makeUser('viewer');
    held.session = { user: { id: me.id, role: 'viewer', sessionVersion: -1 } };
    expect(await getCurrentUser()).toBeNull();
    // The session callback turns a token without a version into -1.
    const s = await authOptions.callbacks!.session!({ session: { user: {}, expires: '' }, token: { uid: me.id, role: 'viewer' } } as never);
    expect((s as { user: { sessionVersion: number } }).user.sessionVersion).toBe(-1);
  });
});

describe('a one-time password must be changed before anything else', () => {
  it('refuses every API call with 403 and a sentence, allows only the password change, then works', async () => {
    const me = await makeUser('analyst', { password: 'one-time password 1' });
    await getDb().update(users).set({ mustChangePassword: true }).where(eq(users.id, me.id));
    held.session = await signIn(me);
    await expect(requireUser()).rejects.toMatchObject({ code: 'forbidden:password-change', status: 403 });
    const answer = await call(libraryRoute.GET);
    expect(answer.status).toBe(403);
    expect(answer.body.code).toBe('forbidden:password-change');
    expect(answer.body.message).toMatch(/choose your own password on your account page/);
    // The account page and its action may still run.
    expect((await requireSignedIn()).id).toBe(me.id);
    await changeOwnPassword(await requireSignedIn(), { currentPassword: 'one-time password 1', newPassword: 'my own password 2' });
    // That session ended with the change; the next one works.
    expect(await getCurrentUser()).toBeNull();
    held.session = await signIn(me);
    expect((await requireUser()).id).toBe(me.id);
    expect((await call(libraryRoute.GET)).status).toBe(200);
  });
});
