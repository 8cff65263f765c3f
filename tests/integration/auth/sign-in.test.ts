import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { signInFailures } from '@/db/schema';
import { attemptSignIn, SIGN_IN_RATE_LIMITED, SIGN_IN_REFUSED } from '@/lib/auth/sign-in';
import type { SessionUser } from '@/lib/auth/guard';
import { makeUser } from '../../support/users';

let active: SessionUser;
let inactive: SessionUser;
const PASSWORD = 'correct horse battery';

beforeAll(async () => {
  await getDb().delete(signInFailures);
  active = await makeUser('analyst', { password: PASSWORD });
  inactive = await makeUser('analyst', { password: PASSWORD, active: false });
});
afterAll(async () => {
  await closeDb();
});

describe('sign-in', () => {
  it('accepts the right password, whatever the case of the e-mail', async () => {
    const r = await attemptSignIn(getDb(), { email: active.email.toUpperCase(), password: PASSWORD, clientAddress: '10.0.0.1' });
    expect(r).toMatchObject({ ok: true, user: { id: active.id, role: 'analyst' } });
  });

  it('gives a wrong password, an unknown e-mail and a deactivated user the same refusal', async () => {
    const wrong = await attemptSignIn(getDb(), { email: active.email, password: 'nope', clientAddress: '10.0.0.2' });
    const unknown = await attemptSignIn(getDb(), { email: 'nobody@test.example', password: PASSWORD, clientAddress: '10.0.0.2' });
    const off = await attemptSignIn(getDb(), { email: inactive.email, password: PASSWORD, clientAddress: '10.0.0.2' });
    for (const r of [wrong, unknown, off]) {
      expect(r).toEqual({ ok: false, reason: 'refused', message: SIGN_IN_REFUSED });
    }
  });

  it('refuses the eleventh quick failure for one e-mail by the rate limit, even with the right password', async () => {
    const target = await makeUser('viewer', { password: PASSWORD });
    for (let i = 0; i < 10; i++) {
      const r = await attemptSignIn(getDb(), { email: target.email, password: `wrong-${i}`, clientAddress: `10.1.0.${i}` });
      expect(r).toMatchObject({ ok: false, reason: 'refused' });
    }
    const eleventh = await attemptSignIn(getDb(), { email: target.email, password: 'wrong-again', clientAddress: '10.1.0.99' });
    expect(eleventh).toEqual({ ok: false, reason: 'rate-limited', message: SIGN_IN_RATE_LIMITED });
    const right = await attemptSignIn(getDb(), { email: target.email, password: PASSWORD, clientAddress: '10.1.0.100' });
    expect(right).toMatchObject({ ok: false, reason: 'rate-limited' });
  });

  it('lets failures age out of the window', async () => {
    const target = await makeUser('viewer', { password: PASSWORD });
    const old = new Date(Date.now() - 60 * 60_000);
    for (let i = 0; i < 10; i++) {
      await attemptSignIn(getDb(), { email: target.email, password: 'wrong', clientAddress: '10.2.0.1' }, old);
    }
    const r = await attemptSignIn(getDb(), { email: target.email, password: PASSWORD, clientAddress: '10.2.0.1' });
    expect(r.ok).toBe(true);
  });

  it('rate-limits one client address trying many e-mails', async () => {
    const addr = '10.3.0.1';
    for (let i = 0; i < 50; i++) {
      await getDb().insert(signInFailures).values({ email: `spray-${i}@test.example`, clientAddress: addr });
    }
    const r = await attemptSignIn(getDb(), { email: active.email, password: PASSWORD, clientAddress: addr });
    expect(r).toMatchObject({ ok: false, reason: 'rate-limited' });
  });
});
