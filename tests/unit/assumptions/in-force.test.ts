import { describe, expect, it } from 'vitest';
import type { AssumptionStatus } from '@/db/schema';
import { inForceCutoff, versionInForceAt, type PublishedRecord } from '@/lib/assumptions/in-force';

const DAY = 86_400_000;
const iso = (t: number) => new Date(t).toISOString().slice(0, 10);
const at = (s: string) => new Date(s);

type Row = PublishedRecord & { id: number };

describe('the version in force on a date (worked examples)', () => {
  // v1 published 2025-01-10 12:00, superseded by v2 on 2025-03-01 09:00 (v2 back-dated to 2024-05-01
  // before the effective-date rule); v2 retired 2025-06-01 15:00.
  const rows: Row[] = [
    { id: 1, version: 1, status: 'superseded', reviewBy: '2026-01-10', publishedAt: at('2025-01-10T12:00:00Z'), endedAt: at('2025-03-01T09:00:00Z') },
    { id: 2, version: 2, status: 'retired', reviewBy: '2025-05-01', publishedAt: at('2025-03-01T09:00:00Z'), endedAt: at('2025-06-01T15:00:00Z') },
  ];
  const now = at('2025-07-01T00:00:00Z');
  const answer = (asOf: string, when = now) => {
    const a = versionInForceAt(rows, asOf, when);
    return a.kind === 'in-force' ? `v${a.version.version}` : a.kind;
  };

  it('before the first publication: nothing; the publication day counts from its end', () => {
    expect(answer('2025-01-09')).toBe('none');
    expect(answer('2025-01-10')).toBe('v1');
  });

  it('follows the supersession chain by publication time, not by the back-dated effective date', () => {
    expect(answer('2025-02-28')).toBe('v1');
    // v2 was published on 2025-03-01, but its review-by date (2025-05-01) had passed by 2025-05-02.
    expect(answer('2025-03-01')).toBe('v2');
    expect(answer('2025-05-01')).toBe('v2');
    expect(answer('2025-05-02')).toBe('expired');
  });

  it('after a retirement: retired, with the day', () => {
    const a = versionInForceAt(rows, '2025-06-01', now);
    expect(a).toMatchObject({ kind: 'retired', on: '2025-06-01' });
  });

  it('today is answered as of now: the answer may change during the day, never after it', () => {
    expect(answer('2025-03-01', at('2025-03-01T08:59:59.999Z'))).toBe('v1');
    expect(answer('2025-03-01', at('2025-03-01T09:00:00.000Z'))).toBe('v2');
  });

  it('the cutoff is the end of the day (UTC) or now, whichever is first; a bad date is a RangeError', () => {
    expect(inForceCutoff('2025-01-01', now).toISOString()).toBe('2025-01-01T23:59:59.999Z');
    expect(inForceCutoff('2030-01-01', now).toISOString()).toBe(now.toISOString());
    expect(() => inForceCutoff('2025-13-45', now)).toThrow(RangeError);
  });
});

// ---------------------------------------------------------------------------------------------
// Property test against a simple model: replay the events (publish, retire, expire) in time order
// and read the state at the cutoff. Written independently of lib/assumptions/in-force.ts.
// ---------------------------------------------------------------------------------------------

type Event = { t: number; kind: 'publish' | 'retire' | 'expire'; version: number };
type Version = { version: number; reviewBy: string };

function replayAnswer(events: Event[], versions: Map<number, Version>, asOf: string, now: number): string {
  const cutoff = Math.min(Date.parse(`${asOf}T00:00:00Z`) + DAY - 1, now);
  let current: number | null = null;
  let ended: { version: number; why: string } | null = null;
  for (const e of events) {
    if (e.t > cutoff) break;
    if (e.kind === 'publish') {
      current = e.version;
      ended = null;
    } else if (current === e.version) {
      ended = { version: e.version, why: e.kind === 'retire' ? 'retired' : 'expired' };
      current = null;
    }
  }
  if (current !== null) return versions.get(current)!.reviewBy < asOf ? `expired v${current}` : `v${current}`;
  if (ended) return `${ended.why} v${ended.version}`;
  return 'none';
}

function rowsFrom(events: Event[], versions: Map<number, Version>): Row[] {
  return [...versions.values()].map((v) => {
    const published = events.find((e) => e.kind === 'publish' && e.version === v.version)!;
    const ending = events.find((e) => e.version === v.version && e.kind !== 'publish');
    const next = events.find((e) => e.kind === 'publish' && e.t > published.t && e.version !== v.version);
    let status: AssumptionStatus = 'published';
    let endedAt: Date | null = null;
    if (ending && (!next || ending.t <= next.t)) {
      status = ending.kind === 'retire' ? 'retired' : 'expired';
      endedAt = new Date(ending.t);
    } else if (next) {
      status = 'superseded';
      endedAt = new Date(next.t);
    }
    return { id: v.version, version: v.version, status, reviewBy: v.reviewBy, publishedAt: new Date(published.t), endedAt };
  });
}

function describeAnswer(a: ReturnType<typeof versionInForceAt<Row>>): string {
  if (a.kind === 'in-force') return `v${a.version.version}`;
  if (a.kind === 'none') return 'none';
  if (a.kind === 'ended') return `ended v${a.version.version}`;
  return `${a.kind} v${a.version.version}`;
}

/** A random history: publications at random times, some versions retired or expired by the scheduler. */
function randomHistory(next: () => number): { events: Event[]; versions: Map<number, Version>; end: number } {
  let t = Date.parse('2020-01-01T00:00:00Z');
  const events: Event[] = [];
  const versions = new Map<number, Version>();
  let current: Version | null = null;
  let n = 0;
  for (let step = 0; step < 4 + (next() % 14); step++) {
    t += next() % (40 * DAY);
    const r = next() % 10;
    if (current && r < 2) {
      events.push({ t, kind: 'retire', version: current.version });
      current = null;
    } else if (current && r < 4 && iso(t) > current.reviewBy) {
      events.push({ t, kind: 'expire', version: current.version });
      current = null;
    } else {
      n += 1;
      const v = { version: n, reviewBy: iso(t + (1 + (next() % 400)) * DAY) };
      versions.set(n, v);
      events.push({ t, kind: 'publish', version: n });
      current = v;
    }
  }
  return { events, versions, end: t + 30 * DAY };
}

describe('the version in force on a date (property, 300 random histories)', () => {
  let seed = 977;
  const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);

  it('agrees with the event replay, for past, present and future dates', () => {
    for (let h = 0; h < 300; h++) {
      const { events, versions, end } = randomHistory(next);
      const rows = rowsFrom(events, versions);
      for (let q = 0; q < 20; q++) {
        const asOf = iso(Date.parse('2019-12-01T00:00:00Z') + (next() % Math.ceil((end - Date.parse('2019-12-01T00:00:00Z')) / DAY)) * DAY);
        const now = events[0].t + (next() % (end - events[0].t));
        expect(describeAnswer(versionInForceAt(rows, asOf, new Date(now))), JSON.stringify({ events, asOf, now })).toBe(
          replayAnswer(events, versions, asOf, now),
        );
      }
    }
  });

  it('an answer for a past date never changes once given', () => {
    for (let h = 0; h < 300; h++) {
      const { events, versions, end } = randomHistory(next);
      const finalRows = rowsFrom(events, versions);
      for (const e of events) {
        // What was stored at the time of the event (later events not yet written).
        const knownEvents = events.filter((x) => x.t <= e.t);
        const known = new Map([...versions].filter(([k]) => knownEvents.some((x) => x.kind === 'publish' && x.version === k)));
        const rowsThen = rowsFrom(knownEvents, known);
        for (let d = 1; d <= 3; d++) {
          const past = iso(e.t - d * (1 + (next() % 60)) * DAY);
          const then = describeAnswer(versionInForceAt(rowsThen, past, new Date(e.t)));
          expect(describeAnswer(versionInForceAt(finalRows, past, new Date(end))), JSON.stringify({ events, past, at: e.t })).toBe(then);
        }
      }
    }
  });
});
