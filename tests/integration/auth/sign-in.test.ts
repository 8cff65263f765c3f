import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { closeDb, getDb } from '@/db/connection';
import { signInFailures } from '@/db/schema';
import { attemptSignIn, SIGN_IN_REFUSED, signInWaitMessage } from '@/lib/auth/sign-in';
import { authOptions } from '@/lib/auth/options';
import type { SessionUser } from '@/lib/auth/guard';
import { makeUser } from '../../support/users';

// The rules of lib/auth/throttle.ts at the defaults of lib/env.ts: 5 free failures per account and
// address, 25 per address, 10 per account; then 1, 2, 4 ... s, capped at 900 s (60 s per account).
let active: SessionUser;
let inactive: SessionUser;
const PASSWORD = 'correct horse battery';
const t0 = Date.parse('2026-03-02T09:00:00.000Z');
const at = (s: number) => new Date(t0 + s * 1000);
let clock = 0;
/** A fresh minute for each test, so that the windows of different tests do not meet. */
function nextMinute(): number {
  clock += 3600;
  return clock;
}

beforeAll(async () => {
  await getDb().delete(signInFailures);
  active = await makeUser('analyst', { password: PASSWORD });
  inactive = await makeUser('analyst', { password: PASSWORD, active: false });
});
afterAll(async () => {
  await closeDb();
});

const attempt = (email: string, password: string, clientAddress: string, s: number) => attemptSignIn(getDb(), { email, password, clientAddress }, at(s));

describe('sign-in', () => {
  it('accepts the right password, whatever the case of the e-mail', async () => {
    const r = await attempt(active.email.toUpperCase(), PASSWORD, '10.0.0.1', nextMinute());
    expect(r).toMatchObject({ ok: true, user: { id: active.id, role: 'analyst' } });
  });

  it('gives a wrong password, an unknown e-mail and a deactivated user the same refusal', async () => {
    const s = nextMinute();
    const wrong = await attempt(active.email, 'nope', '10.0.0.2', s);
    const unknown = await attempt('nobody@test.example', PASSWORD, '10.0.0.2', s);
    const off = await attempt(inactive.email, PASSWORD, '10.0.0.2', s);
    for (const r of [wrong, unknown, off]) expect(r).toEqual({ ok: false, reason: 'refused', message: SIGN_IN_REFUSED });
  });
});

describe('the throttle waits instead of locking the account out', () => {
  it('one address guessing one account: five free failures, then waits of 1, 2, 4 s after the latest', async () => {
    const target = await makeUser('viewer', { password: PASSWORD });
    const s = nextMinute();
    for (let i = 0; i < 5; i++) expect(await attempt(target.email, `wrong-${i}`, '10.1.0.1', s)).toMatchObject({ reason: 'refused' });
    // The sixth attempt, at once: checked (the fifth failure asks for 1 s only from the next one on).
    expect(await attempt(target.email, 'wrong-5', '10.1.0.1', s)).toMatchObject({ reason: 'rate-limited', waitSeconds: 1 });
    expect(await attempt(target.email, 'wrong-5', '10.1.0.1', s + 1)).toMatchObject({ reason: 'refused' });
    // Six failures: 2 s. A refused attempt while waiting is not a failure and does not lengthen it.
    const waiting = await attempt(target.email, PASSWORD, '10.1.0.1', s + 2);
    expect(waiting).toEqual({ ok: false, reason: 'rate-limited', waitSeconds: 1, message: signInWaitMessage(1) });
    const rows = await getDb().select().from(signInFailures).where(eq(signInFailures.email, target.email));
    expect(rows).toHaveLength(6);
    // After the wait the right password works, and clears this address's failures for the account.
    expect(await attempt(target.email, PASSWORD, '10.1.0.1', s + 3)).toMatchObject({ ok: true });
    expect(await getDb().select().from(signInFailures).where(and(eq(signInFailures.email, target.email), eq(signInFailures.clientAddress, '10.1.0.1')))).toHaveLength(0);
  });

  it('the owner’s right password works after someone else’s failures, within the account’s 60 s', async () => {
    const owner = await makeUser('analyst', { password: PASSWORD });
    const s = nextMinute();
    // An attacker from another address, as fast as the throttle lets it, for ten minutes.
    let t = s;
    let failures = 0;
    let lastFailure = s;
    while (t < s + 600) {
      const r = await attempt(owner.email, `guess-${failures}`, '198.51.100.66', t);
      if (r.ok) throw new Error('the guess cannot be right');
      if (r.reason === 'refused') {
        failures += 1;
        lastFailure = t;
      } else t += r.waitSeconds;
    }
    // 5 free guesses, then the doubling: at 1, 3, 7, 15, 31, 63, 127, 255 and 511 s, by hand.
    expect(failures).toBe(14);
    expect(lastFailure).toBe(s + 511);
    // The owner, from their own address, right after that: a wait of at most 60 s (here 2^(14-10) = 16 s) ...
    const soon = await attempt(owner.email, PASSWORD, '203.0.113.10', lastFailure);
    expect(soon).toMatchObject({ ok: false, reason: 'rate-limited', waitSeconds: 16 });
    // ... and then the right password works.
    expect(await attempt(owner.email, PASSWORD, '203.0.113.10', lastFailure + 16)).toMatchObject({ ok: true });
    // The attacker's address waits 2^(14-5) = 512 s after its latest failure, whatever it sends.
    expect(await attempt(owner.email, PASSWORD, '198.51.100.66', lastFailure + 61)).toMatchObject({ ok: false, reason: 'rate-limited', waitSeconds: 451 });
  });

  it('one address spraying many accounts waits after 25 failures, whatever the account', async () => {
    const s = nextMinute();
    const addr = '10.3.0.1';
    await getDb()
      .insert(signInFailures)
      .values(Array.from({ length: 27 }, (_, i) => ({ email: `spray-${i}@test.example`, clientAddress: addr, at: at(s) })));
    const r = await attempt(active.email, PASSWORD, addr, s);
    expect(r).toMatchObject({ ok: false, reason: 'rate-limited', waitSeconds: 4 });
    expect(await attempt(active.email, PASSWORD, '10.3.0.2', s)).toMatchObject({ ok: true });
  });

  it('lets failures age out of the window', async () => {
    const target = await makeUser('viewer', { password: PASSWORD });
    const s = nextMinute();
    await getDb()
      .insert(signInFailures)
      .values(Array.from({ length: 12 }, () => ({ email: target.email, clientAddress: '10.2.0.1', at: at(s) })));
    expect(await attempt(target.email, PASSWORD, '10.2.0.1', s + 60)).toMatchObject({ reason: 'rate-limited' });
    expect(await attempt(target.email, PASSWORD, '10.2.0.1', s + 16 * 60)).toMatchObject({ ok: true });
  });
});

describe('the address a failure is recorded under', () => {
  it('is the stamped socket address, not a client-supplied X-Forwarded-For', async () => {
    process.env.RHOBOOK_SOCKET_TOKEN = 'test-token';
    const provider = authOptions.providers[0] as unknown as {
      options: { authorize: (c: Record<string, string>, req: { headers: Record<string, string> }) => Promise<unknown> };
    };
    const email = `spoof-${Date.now().toString(36)}@test.example`;
    await expect(
      provider.options.authorize({ email, password: 'wrong password' }, { headers: { 'x-forwarded-for': '198.51.100.1', 'x-rhobook-socket': 'test-token 203.0.113.77' } }),
    ).rejects.toThrow('refused');
    const rows = await getDb().select().from(signInFailures).where(eq(signInFailures.email, email));
    expect(rows.map((r) => r.clientAddress)).toEqual(['203.0.113.77']);
    delete process.env.RHOBOOK_SOCKET_TOKEN;
  });
});
