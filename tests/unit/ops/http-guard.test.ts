import { describe, expect, it } from 'vitest';
import { DEVELOPMENT_SECRET, productionSecretProblem, refuseUnknownMethod } from '@/lib/ops/http-guard.mjs';
import { usesHttps } from '@/lib/auth/options';

function fakeResponse() {
  const r = { status: 0, headers: {} as Record<string, unknown>, body: undefined as string | undefined };
  return {
    r,
    res: {
      writeHead(status: number, headers: Record<string, unknown>) {
        r.status = status;
        r.headers = headers;
        return this;
      },
      end(body?: string) {
        r.body = body;
        return this;
      },
    },
  };
}

describe('the web process refuses methods the app does not serve', () => {
  it('TRACE, CONNECT and WebDAV verbs get 405 with Allow; the served ones pass', () => {
    for (const method of ['TRACE', 'CONNECT', 'PROPFIND', 'MKCOL']) {
      const { r, res } = fakeResponse();
      expect(refuseUnknownMethod({ method }, res as never)).toBe(true);
      expect(r.status).toBe(405);
      expect(r.headers.Allow).toBe('GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS');
      expect(JSON.parse(r.body!).code).toBe('bad_request:method');
    }
    for (const method of ['GET', 'HEAD', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS']) {
      const { r, res } = fakeResponse();
      expect(refuseUnknownMethod({ method }, res as never)).toBe(false);
      expect(r.status).toBe(0);
    }
  });
});

describe('a production start refuses a session secret anyone knows', () => {
  it('names the problem for a missing, the public default and a short secret; accepts a long one; development is left alone', () => {
    expect(productionSecretProblem({ NODE_ENV: 'production' })).toMatch(/^NEXTAUTH_SECRET is not set/);
    expect(productionSecretProblem({ NODE_ENV: 'production', NEXTAUTH_SECRET: DEVELOPMENT_SECRET })).toMatch(/public development default/);
    expect(DEVELOPMENT_SECRET).toBe('rhobook-development-secret-change-me'); // lib/env.ts's default
    expect(productionSecretProblem({ NODE_ENV: 'production', NEXTAUTH_SECRET: 'short-but-16-chars' })).toMatch(/has 18 characters/);
    expect(productionSecretProblem({ NODE_ENV: 'production', NEXTAUTH_SECRET: 'a'.repeat(64) })).toBeNull();
    expect(productionSecretProblem({ NODE_ENV: 'development', NEXTAUTH_SECRET: DEVELOPMENT_SECRET })).toBeNull();
  });
});

describe('the session cookie is Secure over HTTPS', () => {
  it('follows the scheme of NEXTAUTH_URL', () => {
    expect(usesHttps('https://rhobook.fenmoor.example')).toBe(true);
    expect(usesHttps('HTTPS://rhobook.fenmoor.example')).toBe(true);
    expect(usesHttps('http://127.0.0.1:3000')).toBe(false);
    expect(usesHttps(undefined)).toBe(false);
  });
});
