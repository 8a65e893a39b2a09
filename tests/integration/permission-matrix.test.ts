/**
 * Every API route × every role (and signed out), against the running server. Each route's
 * permission is read from the route itself; the expected answer comes from the permission
 * table: signed out → 401, a role without the permission → 403, a role with it → anything
 * but 401/403 (ids here name nothing, so most answers are 400 or 404). Deny by default is
 * checked statically in tests/unit/api-routes.test.ts; this checks the server enforces it.
 */
import { describe, expect, it } from 'vitest';
import { can, roles } from '@/lib/auth/permissions';
import { routePermission } from '@/lib/server/route';
import { Client, demoEmails, signedIn } from '../support/http';

const modules = import.meta.glob<Record<string, unknown>>('/src/pages/api/**/*.ts', {
  eager: true,
});
const methods = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;

/** "/src/pages/api/releases/[id]/waivers/[waiverId].ts" → "/api/releases/no-such-id/waivers/no-such-id". */
function urlOf(file: string): string {
  return file
    .replace(/^\/src\/pages/, '')
    .replace(/\.ts$/, '')
    .replace(/\/index$/, '')
    .replace(/\[[^\]/]+\]/g, 'no-such-id');
}

const cases = Object.entries(modules).flatMap(([file, mod]) =>
  methods
    .filter((m) => m in mod)
    .map((method) => ({
      file,
      method,
      url: urlOf(file),
      permission: routePermission(mod[method]) ?? '',
    }))
    .filter((c) => c.permission !== 'public'),
);

describe('permission matrix over every API route', () => {
  it('covers the routes', () => {
    expect(cases.length).toBeGreaterThanOrEqual(40);
    for (const c of cases) expect(c.permission, `${c.method} ${c.url}`).not.toBe('');
  });

  it('signed out, every protected route answers 401', async () => {
    const anonymous = new Client();
    for (const c of cases) {
      const response = await anonymous.request(
        c.method,
        c.url,
        c.method === 'GET' ? undefined : {},
      );
      expect(response.status, `${c.method} ${c.url}`).toBe(401);
    }
  });

  it.each(roles)('%s gets 403 exactly where the permission table says no', async (role) => {
    const client = await signedIn(demoEmails[role]);
    for (const c of cases) {
      const response = await client.request(c.method, c.url, c.method === 'GET' ? undefined : {});
      const label = `${role} ${c.method} ${c.url} (${c.permission}) → ${response.status}`;
      if (can(role, c.permission)) {
        expect([401, 403], label).not.toContain(response.status);
      } else {
        expect(response.status, label).toBe(403);
      }
      expect(response.status, label).toBeLessThan(500);
    }
  });
});
