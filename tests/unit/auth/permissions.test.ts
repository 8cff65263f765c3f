import { describe, expect, it } from 'vitest';
import { can, permissions } from '@/lib/auth/permissions';
import { roles } from '@/db/schema';

// Source: DESIGN.md, "Who uses it" (the product's role definitions).
describe('role permissions', () => {
  it('only administrators manage users and tokens', () => {
    for (const r of roles) {
      expect(can(r, 'users:manage')).toBe(r === 'admin');
      expect(can(r, 'tokens:manage')).toBe(r === 'admin');
    }
  });

  it('administrators cannot approve assumptions (DESIGN.md: "cannot approve assumptions")', () => {
    expect(can('admin', 'assumptions:review')).toBe(false);
  });

  it('only analysts draft and only validators review (DESIGN.md, lifecycle)', () => {
    expect(roles.filter((r) => can(r, 'assumptions:draft'))).toEqual(['analyst']);
    expect(roles.filter((r) => can(r, 'assumptions:review'))).toEqual(['validator']);
  });

  it('only validators record validation findings; analysts and validators comment on them (the model-risk reviewer records, the owner answers)', () => {
    expect(roles.filter((r) => can(r, 'findings:record'))).toEqual(['validator']);
    expect(roles.filter((r) => can(r, 'findings:comment'))).toEqual(['analyst', 'validator']);
  });

  it('analysts and administrators keep the register of consuming models; everyone reads it', () => {
    expect(roles.filter((r) => can(r, 'models:manage'))).toEqual(['analyst', 'admin']);
    expect(roles.filter((r) => can(r, 'models:read'))).toEqual([...roles]);
  });

  it('viewers may read but not upload or run fits', () => {
    expect(can('viewer', 'assumptions:read')).toBe(true);
    expect(can('viewer', 'datasets:upload')).toBe(false);
    expect(can('viewer', 'fits:run')).toBe(false);
  });

  it('every permission names at least one role and only known roles', () => {
    for (const [name, allowed] of Object.entries(permissions)) {
      expect(allowed.length, name).toBeGreaterThan(0);
      for (const r of allowed) expect(roles).toContain(r);
    }
  });
});
