import { describe, expect, it } from 'vitest';
import { activeNavHref, navFor } from '@/lib/nav';

describe('navigation', () => {
  it('shows the Outbox to administrators only while mail is captured locally (no SMTP_URL)', () => {
    expect(navFor('admin', true).map((i) => i.href)).toContain('/admin/outbox');
    expect(navFor('admin', false).map((i) => i.href)).not.toContain('/admin/outbox');
    expect(navFor('admin', false).map((i) => i.href)).toContain('/admin/tokens');
    for (const role of ['viewer', 'analyst', 'validator'] as const) {
      expect(navFor(role, true).map((i) => i.href)).not.toContain('/admin/outbox');
    }
  });

  it('highlights the longest matching entry, one at a time', () => {
    const hrefs = navFor('admin', true).map((i) => i.href);
    expect(activeNavHref(hrefs, '/admin/tokens')).toBe('/admin/tokens');
    expect(activeNavHref(hrefs, '/admin/outbox')).toBe('/admin/outbox');
    expect(activeNavHref(hrefs, '/admin')).toBe('/admin');
    expect(activeNavHref(hrefs, '/admin/users/3')).toBe('/admin');
    expect(activeNavHref(hrefs, '/library/versions/4')).toBe('/library');
    expect(activeNavHref(hrefs, '/')).toBe('/');
    // A prefix that is not a path segment does not match: /administrator is not under /admin.
    expect(activeNavHref(hrefs, '/administrator')).toBeNull();
  });
});
