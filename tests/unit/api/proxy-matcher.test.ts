/**
 * The proxy must not run for the upload route: Next buffers a copy of the body of every request
 * that passes through the proxy and cuts it at 10 MB (experimental.proxyClientMaxBodySize), which
 * cut loan tapes above 10 MB short (found in QA: a 52 MB tape was answered 400 "cut off"). The
 * matcher is a path pattern whose group is a plain regular expression; it is checked here as one.
 */
import { describe, expect, it } from 'vitest';
import { config } from '@/proxy';

const matches = (path: string) => config.matcher.some((m) => new RegExp(`^${m}$`).test(path));

describe('proxy matcher', () => {
  it('leaves out the upload route, the consumer API and the health check only', () => {
    expect(matches('/api/datasets')).toBe(false);
    // Token-authenticated and public to the proxy anyway; going through it cost each call a copy of
    // its headers and a second routing pass (lib/bench/consumer-api.ts).
    for (const p of ['/api/v1/assumptions', '/api/v1/assumptions/3/versions/2', '/api/v1/factor-matrices', '/api/health']) expect(matches(p), p).toBe(false);
    for (const p of ['/', '/data', '/data/upload', '/api/datasets/7', '/api/datasets/7/cohorts.csv', '/api/admin/users', '/admin', '/api/v1', '/api/healthy', '/api/openapi']) {
      expect(matches(p), p).toBe(true);
    }
    expect(matches('/_next/static/chunk.js')).toBe(false);
  });
});
