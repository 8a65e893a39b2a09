import { describe, expect, it } from 'vitest';
import { can, permissions, roles } from '@/lib/auth/permissions';

// The expected table is PRODUCT.md's "Roles and permissions", written out again here by
// hand so a change to src/lib/auth/permissions.ts has to be made twice, on purpose.
const expected: Record<string, string[]> = {
  'audio:upload': ['admin', 'engineer'],
  'order:edit': ['admin', 'engineer'],
  'check:run': ['admin', 'engineer', 'coordinator'],
  'finding:read': ['admin', 'engineer', 'coordinator'],
  'metadata:edit': ['admin', 'coordinator'],
  'waiver:audio': ['admin', 'engineer'],
  'waiver:metadata': ['admin', 'coordinator'],
  'audio:signoff': ['admin', 'engineer'],
  'release:approve': ['admin', 'coordinator'],
  'release:reopen': ['admin', 'coordinator'],
  'release:share': ['admin', 'coordinator'],
  'package:download': ['admin', 'distributor'],
  'package:acknowledge': ['admin', 'distributor'],
  'member:manage': ['admin'],
  'profile:manage': ['admin'],
  'registrant:manage': ['admin'],
};

describe('permission table', () => {
  it.each(Object.entries(expected))('%s is allowed exactly for %j', (action, allowed) => {
    for (const role of roles) {
      expect(can(role, action), `${role} → ${action}`).toBe(allowed.includes(role));
    }
  });

  it('every role may list and read releases (visibility is narrowed elsewhere)', () => {
    for (const role of roles) {
      expect(can(role, 'release:list')).toBe(true);
      expect(can(role, 'release:read')).toBe(true);
    }
  });

  it('denies by default: unknown actions, unknown roles, no role', () => {
    expect(can('admin', 'release:delete-everything')).toBe(false);
    expect(can('admin', 'toString')).toBe(false);
    expect(can('admin', '__proto__')).toBe(false);
    expect(can('owner', 'release:list')).toBe(false);
    expect(can('member', 'release:list')).toBe(false);
    expect(can(null, 'release:list')).toBe(false);
    expect(can(undefined, 'release:list')).toBe(false);
    expect(can('', 'release:list')).toBe(false);
  });

  it('a distributor can do nothing but read shared releases and handle packages', () => {
    const distributorActions = Object.entries(permissions)
      .filter(([, allowed]) => (allowed as readonly string[]).includes('distributor'))
      .map(([action]) => action)
      .sort();
    expect(distributorActions).toEqual([
      'package:acknowledge',
      'package:download',
      'release:list',
      'release:read',
    ]);
  });
});
