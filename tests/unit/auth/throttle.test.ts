import { describe, expect, it } from 'vitest';
import { backoffSeconds, secondsToWait, signInWaitMessage } from '@/lib/auth/throttle';

const rules = { free: 5, maxSeconds: 900, accountMaxSeconds: 60 };
const none = { count: 0, last: null };
const t0 = new Date('2026-01-05T10:00:00.000Z');
const after = (s: number) => new Date(t0.getTime() + s * 1000);

describe('sign-in back-off (worked by hand)', () => {
  it('doubles after the free failures, up to the cap', () => {
    expect([0, 4, 5, 6, 7, 10, 14, 15, 40].map((n) => backoffSeconds(n, 5, 900))).toEqual([0, 0, 1, 2, 4, 32, 512, 900, 900]);
  });

  it('one account from one address: the sixth failure asks for 2 s after the latest', () => {
    const pair = { count: 6, last: t0 };
    const groups = { pair, address: pair, account: pair };
    expect(secondsToWait(groups, rules, after(0))).toBe(2);
    expect(secondsToWait(groups, rules, after(1.5))).toBe(1);
    expect(secondsToWait(groups, rules, after(2))).toBe(0);
  });

  it('someone else’s many failures on the account make its owner (another address) wait at most the account cap', () => {
    const attacker = { count: 40, last: t0 };
    const groups = { pair: none, address: none, account: attacker };
    expect(secondsToWait(groups, rules, after(0))).toBe(60);
    expect(secondsToWait(groups, rules, after(59.2))).toBe(1);
    expect(secondsToWait(groups, rules, after(60))).toBe(0);
    // The attacker's own address keeps the long wait: 2^(40-5) capped at 900 s.
    expect(secondsToWait({ pair: attacker, address: attacker, account: attacker }, rules, after(60))).toBe(840);
  });

  it('one address trying many accounts: 25 free failures, then the doubling', () => {
    expect(secondsToWait({ pair: none, address: { count: 24, last: t0 }, account: none }, rules, t0)).toBe(0);
    expect(secondsToWait({ pair: none, address: { count: 27, last: t0 }, account: none }, rules, t0)).toBe(4);
  });

  it('says how long in words', () => {
    expect(signInWaitMessage(1)).toBe('Too many failed sign-ins for this account or from this address: wait a second and try again.');
    expect(signInWaitMessage(45)).toMatch(/wait 45 seconds/);
    expect(signInWaitMessage(840)).toMatch(/wait about 14 minutes/);
  });
});
