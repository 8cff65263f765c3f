import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { crossOriginReason } from '@/lib/auth/same-origin';

const OWN = 'http://127.0.0.1:3000';
const h = (o: Record<string, string>) => new Headers(o);

// What browsers send, from the Fetch standard (Origin on every non-GET request) and W3C Fetch
// Metadata (Sec-Fetch-Site: same-origin, same-site, cross-site, none).
describe('cross-origin requests are told from the app’s own', () => {
  it('Origin must be the app’s origin exactly: another port, host or scheme is another origin', () => {
    expect(crossOriginReason(h({ origin: OWN }), OWN)).toBeNull();
    for (const other of ['http://127.0.0.1:4000', 'http://localhost:3000', 'https://127.0.0.1:3000', 'http://evil.example', 'null']) {
      expect(crossOriginReason(h({ origin: other }), OWN), other).toMatch(/^it comes from /);
    }
    // Origin decides when both are there.
    expect(crossOriginReason(h({ origin: 'http://127.0.0.1:4000', 'sec-fetch-site': 'same-origin' }), OWN)).not.toBeNull();
  });

  it('without Origin, Sec-Fetch-Site must be same-origin or none', () => {
    expect(crossOriginReason(h({ 'sec-fetch-site': 'same-origin' }), OWN)).toBeNull();
    expect(crossOriginReason(h({ 'sec-fetch-site': 'none' }), OWN)).toBeNull();
    expect(crossOriginReason(h({ 'sec-fetch-site': 'same-site' }), OWN)).toBe('the browser marks it as same-site');
    expect(crossOriginReason(h({ 'sec-fetch-site': 'cross-site' }), OWN)).toBe('the browser marks it as cross-site');
  });

  it('with neither header (a script, not a browser) the request passes this check', () => {
    expect(crossOriginReason(h({}), OWN)).toBeNull();
  });
});

/** Every file under dir whose name is `name`. */
function filesNamed(dir: string, name: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = path.join(dir, f);
    return statSync(p).isDirectory() ? filesNamed(p, name) : f === name ? [p] : [];
  });
}

describe('every state-changing entry point uses the one helper', () => {
  const root = path.resolve(import.meta.dirname, '../../..');

  it('each POST, PATCH, PUT and DELETE route handler checks origin and content type through lib/auth/same-origin', () => {
    const routes = filesNamed(path.join(root, 'app/api'), 'route.ts').filter((f) => !f.includes('[...nextauth]'));
    let checked = 0;
    for (const file of routes) {
      const text = readFileSync(file, 'utf8');
      for (const m of text.matchAll(/export async function (POST|PATCH|PUT|DELETE)\([^)]*\)[^{]*\{([\s\S]*?)\n\}/g)) {
        checked += 1;
        expect(m[2], `${path.relative(root, file)} ${m[1]}`).toMatch(/readJsonBody\(req\)|assertSameOrigin\(req\)|assertMultipartRequest\(req\)/);
      }
    }
    expect(checked).toBeGreaterThanOrEqual(13);
  });

  it('each server action checks the origin first', () => {
    const actions = filesNamed(path.join(root, 'app'), 'actions.ts');
    expect(actions.length).toBeGreaterThanOrEqual(3);
    for (const file of actions) {
      const text = readFileSync(file, 'utf8');
      for (const m of text.matchAll(/export async function (\w+)\([^)]*\)[^{]*\{\s*try \{\s*([^\n]*)/g)) {
        expect(m[2], `${path.relative(root, file)} ${m[1]}`).toBe('await assertSameOriginAction();');
      }
    }
  });
});
