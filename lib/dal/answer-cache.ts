import 'server-only';
import { getDb } from '@/db/client';
import { todayIso } from '@/lib/assumptions/dates';
import { AppError } from '@/lib/errors';
import { changeStamp } from './change-stamp';

/**
 * The consumer API's in-force answers, kept in this process while the data they were built from is
 * unchanged: a downstream model asks the same few questions hundreds of times a second, and
 * building an answer reads seven tables (measured: 3.7 ms of CPU per answer; lib/bench/consumer-api.ts).
 *
 * An answer is served from here only when the change stamp (./change-stamp.ts), read first on
 * every request, equals the stamp read before the answer was built: any commit to a table the
 * answer reads changes the stamp, so an answer is never served after a publication, an ending, a
 * change of policy, a new dataset or backtest, or a change of a person's name. The stamp is taken
 * before the data, so an answer built from data newer than its stamp is only replaced early.
 *
 * Time: an answer for a past date reads the state at the end of that day, which no later write can
 * change, and the stamp covers the rest. An answer for today or later reads the state now; with no
 * commit since it was built, every stored time it could read is older than it (the writers stamp
 * their rows with their own clock before committing), so it stays right. Because that needs the
 * clocks of the machines that write and serve to agree, such an answer is also rebuilt at least
 * every LIVE_MAX_AGE_MS. The asked date is part of the key, so the day's rollover is a new answer.
 *
 * Only answers and the 404s of the in-force rule are kept (never a failure of the database), at
 * most MAX_ENTRIES of them, the least recently used dropped first.
 */
const LIVE_MAX_AGE_MS = 60_000;
const MAX_ENTRIES = 2_000;

type Entry<T> = { stamp: string; at: number; live: boolean; value?: T; error?: AppError };

const g = globalThis as unknown as { __rhobookAnswers?: Map<string, Entry<unknown>> };
function entries(): Map<string, Entry<unknown>> {
  if (!g.__rhobookAnswers) g.__rhobookAnswers = new Map();
  return g.__rhobookAnswers;
}

/** What the cache did for the last lookups (tests and the bench read it). */
export const answerCacheStats = { hits: 0, misses: 0 };

/**
 * The answer for `key` (every input of `build` except the clock: the route, the segment, the
 * asked date) about the date `asOf`: the kept one when nothing it was built from has changed, else
 * `build(now)`, kept. `build` receives the instant the answer is for. `stampRead` is a stamp the
 * caller read just now (with the token: ./tokens.ts); without it the stamp is read here.
 */
export async function cachedAnswer<T>(key: string, asOf: string, build: (now: Date) => Promise<T>, stampRead?: string): Promise<T> {
  const stamp = stampRead ?? (await changeStamp(getDb()));
  const now = new Date();
  const map = entries();
  const kept = map.get(key) as Entry<T> | undefined;
  if (kept && kept.stamp === stamp && (!kept.live || now.getTime() - kept.at < LIVE_MAX_AGE_MS)) {
    answerCacheStats.hits++;
    map.delete(key);
    map.set(key, kept);
    if (kept.error) throw kept.error;
    return kept.value as T;
  }
  answerCacheStats.misses++;
  const live = asOf >= todayIso(now);
  let entry: Entry<T>;
  try {
    entry = { stamp, at: now.getTime(), live, value: await build(now) };
  } catch (err) {
    if (!(err instanceof AppError) || err.status !== 404) throw err;
    entry = { stamp, at: now.getTime(), live, error: err };
  }
  map.delete(key);
  map.set(key, entry as Entry<unknown>);
  if (map.size > MAX_ENTRIES) map.delete(map.keys().next().value!);
  if (entry.error) throw entry.error;
  return entry.value as T;
}

/** Forgets every kept answer (tests). */
export function clearAnswerCache(): void {
  entries().clear();
  answerCacheStats.hits = 0;
  answerCacheStats.misses = 0;
}
