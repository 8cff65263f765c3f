/**
 * The sign-in throttle: instead of locking an account after a number of wrong passwords (which lets
 * anyone lock anyone out), each failure makes the next attempt wait, longer the more failures there
 * were, and the wait is kept apart by who failed:
 *
 * - one account from one address (a person mistyping, or one machine guessing one password):
 *   `free` failures, then 1, 2, 4, 8 ... seconds after the latest, up to `maxSeconds`;
 * - one address, any account (one machine trying many accounts): five times as many free
 *   failures, then the same doubling, up to `maxSeconds`;
 * - one account, any address (guesses spread over many machines): twice as many free failures,
 *   then the doubling up to `accountMaxSeconds`, which is short: the account's owner, signing in
 *   from their own address, waits at most that long after someone else's failure.
 *
 * Failures older than the window are forgotten; refused attempts (while waiting) are not failures,
 * so hammering does not lengthen the wait. The wait asked for is the longest of the three.
 * (Exponential back-off instead of a hard lock-out: OWASP Authentication Cheat Sheet, "Account
 * Lockout"; NIST SP 800-63B, section 5.2.2, "Rate Limiting (Throttling)".)
 */
export type FailureGroup = { count: number; last: Date | null };

export type ThrottleRules = { free: number; maxSeconds: number; accountMaxSeconds: number };

/** Seconds to wait after the latest of `count` failures in a group: 0 up to `free`, then 1, 2, 4 ... up to `cap`. */
export function backoffSeconds(count: number, free: number, cap: number): number {
  if (count < free) return 0;
  return Math.min(cap, 2 ** Math.min(count - free, 30));
}

/** Whole seconds (rounded up) before the next attempt may be checked; 0 when it may be now. */
export function secondsToWait(
  groups: { pair: FailureGroup; address: FailureGroup; account: FailureGroup },
  rules: ThrottleRules,
  now: Date,
): number {
  const wait = (g: FailureGroup, free: number, cap: number) =>
    g.last ? g.last.getTime() + backoffSeconds(g.count, free, cap) * 1000 - now.getTime() : 0;
  const ms = Math.max(
    0,
    wait(groups.pair, rules.free, rules.maxSeconds),
    wait(groups.address, rules.free * 5, rules.maxSeconds),
    wait(groups.account, rules.free * 2, rules.accountMaxSeconds),
  );
  return Math.ceil(ms / 1000);
}

/** "12 seconds" or "about 4 minutes": the wait in a sentence. */
export function waitInWords(seconds: number): string {
  if (seconds <= 1) return 'a second';
  if (seconds < 90) return `${seconds} seconds`;
  return `about ${Math.ceil(seconds / 60)} minutes`;
}

/** The sentence of a refused attempt, shown on the sign-in page. */
export function signInWaitMessage(seconds: number): string {
  return `Too many failed sign-ins for this account or from this address: wait ${waitInWords(seconds)} and try again.`;
}
