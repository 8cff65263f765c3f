import { describe, expect, it } from 'vitest';
import { prepared } from '@/lib/dal/prepared';

// lib/dal/prepared.ts: a query is built once per database handle and key (common practice for
// prepared statements: build once, execute many times).
describe('prepared queries', () => {
  it('builds a query once per handle and key, and anew for another handle or key', () => {
    const a = {};
    const b = {};
    let builds = 0;
    const build = () => ({ n: ++builds });
    const first = prepared(a, 'q', build);
    expect(prepared(a, 'q', build)).toBe(first);
    expect(builds).toBe(1);
    expect(prepared(b, 'q', build)).not.toBe(first); // a new pool after closeDb, or a transaction
    expect(prepared(a, 'other', build)).not.toBe(first);
    expect(builds).toBe(3);
  });
});
