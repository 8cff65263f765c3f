import { expect } from 'vitest';
import { Readable } from 'node:stream';
import type { Finding } from '@/lib/ingest/findings';

/** The one finding with this rule; fails when there is none or more than one. */
export function only(findings: readonly Finding[], rule: string): Finding {
  const hits = findings.filter((f) => f.rule === rule);
  expect(hits, `findings with rule ${rule}: ${JSON.stringify(findings)}`).toHaveLength(1);
  return hits[0];
}

export function expectFinding(
  findings: readonly Finding[],
  rule: string,
  severity: 'error' | 'warning',
  line: number | null,
  column?: string | null,
): Finding {
  const f = only(findings, rule);
  expect(f.severity).toBe(severity);
  expect(f.line).toBe(line);
  if (column !== undefined) expect(f.column).toBe(column);
  expect(f.message.length).toBeGreaterThan(20);
  return f;
}

/** A byte stream delivering `bytes` in pieces of `size` bytes (to cross every boundary). */
export function chunked(bytes: Uint8Array | string, size: number): Readable {
  const b = typeof bytes === 'string' ? Buffer.from(bytes, 'utf8') : Buffer.from(bytes);
  const parts: Buffer[] = [];
  for (let i = 0; i < b.length; i += size) parts.push(b.subarray(i, i + size));
  return Readable.from(parts);
}
