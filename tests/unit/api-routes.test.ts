import { describe, expect, it } from 'vitest';
import { permissions } from '@/lib/auth/permissions';
import { routePermission } from '@/lib/server/route';

// Every module under src/pages/api, loaded the way Astro loads it.
const modules = import.meta.glob<Record<string, unknown>>('/src/pages/api/**/*.ts', {
  eager: true,
});
const methods = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE', 'ALL'];

// Routes that are public on purpose; each says why in a comment beside its handler.
const publicRoutes = new Set([
  '/src/pages/api/auth/[...all].ts ALL',
  '/src/pages/api/invitations/[id]/index.ts GET',
  '/src/pages/api/invitations/[id]/accept.ts POST',
  '/src/pages/api/dev/mail.ts GET',
]);

describe('deny by default', () => {
  const handlers = Object.entries(modules).flatMap(([file, mod]) =>
    methods.filter((m) => m in mod).map((m) => ({ id: `${file} ${m}`, handler: mod[m] })),
  );

  it('finds the API routes', () => {
    expect(handlers.length).toBeGreaterThanOrEqual(6);
  });

  it.each(handlers.map((h) => [h.id, h.handler] as const))(
    '%s names its permission',
    (id, handler) => {
      const permission = routePermission(handler);
      expect(permission, `${id} is not built with defineRoute/definePublicRoute`).toBeDefined();
      if (permission === 'public') {
        expect(publicRoutes.has(id), `${id} is public but not on the list of public routes`).toBe(
          true,
        );
      } else {
        expect(Object.keys(permissions)).toContain(permission);
      }
    },
  );
});
