/**
 * A user changes their own password only by typing the current one again (found in QA: the
 * account page changed it on the strength of an open session alone).
 */
import { eq } from 'drizzle-orm';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { users } from '@/db/schema';
import { verifyPassword } from '@/lib/auth/password';
import { changeOwnPassword } from '@/lib/dal/users';
import { makeUser } from '../../support/users';

afterAll(async () => {
  await closeDb();
});

const hashOf = async (id: number) => (await getDb().select({ h: users.passwordHash, must: users.mustChangePassword }).from(users).where(eq(users.id, id)))[0];

describe('changing one\'s own password', () => {
  it('refuses a wrong current password, a short one and an unchanged one, and keeps the old hash', async () => {
    const me = await makeUser('viewer', { password: 'first password 1' });
    const before = await hashOf(me.id);
    await expect(changeOwnPassword(me, { currentPassword: 'not my password', newPassword: 'second password 2' })).rejects.toMatchObject({
      code: 'invalid:current-password',
      status: 422,
    });
    await expect(changeOwnPassword(me, { currentPassword: 'first password 1', newPassword: 'short' })).rejects.toMatchObject({ code: 'invalid:password' });
    await expect(changeOwnPassword(me, { currentPassword: 'first password 1', newPassword: 'first password 1' })).rejects.toMatchObject({ code: 'invalid:password' });
    expect((await hashOf(me.id)).h).toBe(before.h);
  });

  it('changes it with the right current password and clears the invitation flag', async () => {
    const me = await makeUser('analyst', { password: 'first password 1' });
    await getDb().update(users).set({ mustChangePassword: true }).where(eq(users.id, me.id));
    expect((await hashOf(me.id)).must).toBe(true);
    await changeOwnPassword(me, { currentPassword: 'first password 1', newPassword: 'second password 2' });
    expect((await hashOf(me.id)).must).toBe(false);
    const after = await hashOf(me.id);
    expect(await verifyPassword('second password 2', after.h)).toBe(true);
    expect(await verifyPassword('first password 1', after.h)).toBe(false);
    expect(after.must).toBe(false);
  });

  it('a deactivated account cannot change it', async () => {
    const me = await makeUser('analyst', { password: 'first password 1', active: false });
    await expect(changeOwnPassword(me, { currentPassword: 'first password 1', newPassword: 'second password 2' })).rejects.toMatchObject({ code: 'unauthorized:session' });
  });
});
