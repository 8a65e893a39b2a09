/**
 * Every API route × every role (and signed out), against the running server. Each route's
 * permission is read from the route itself; the expected answer comes from the permission
 * table: signed out → 401, a role without the permission → 403, a role with it → anything
 * but 401/403 (ids here name nothing, so most answers are 400 or 404). Deny by default is
 * checked statically in tests/unit/api-routes.test.ts; this checks the server enforces it.
 * Last, the admin of another label calls every route with the real ids of the demo label's
 * things: none may be found, changed or listed.
 */
import { hashPassword } from 'better-auth/crypto';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { can, roles } from '@/lib/auth/permissions';
import { createDatabase } from '@/lib/db/client';
import {
  account,
  audioFiles,
  invitation,
  member,
  organization,
  packages,
  releases,
  tracks,
  uploads,
  user,
  waivers,
} from '@/lib/db/schema';
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

describe("another label reaching for this label's things", () => {
  const db = createDatabase(inject('databaseUrl'));
  const outsider = 'admin@saltmarsh.test';
  const ids: Record<string, string> = {};

  beforeAll(async () => {
    const [existing] = await db.select().from(user).where(eq(user.email, outsider));
    if (!existing) {
      await db
        .insert(user)
        .values({ id: 'usr-saltmarsh', name: 'Saltmarsh Admin', email: outsider });
      await db.insert(account).values({
        id: 'acc-saltmarsh',
        accountId: 'usr-saltmarsh',
        providerId: 'credential',
        userId: 'usr-saltmarsh',
        password: await hashPassword('saltmarsh-password'),
      });
      await db
        .insert(organization)
        .values({ id: 'org-saltmarsh', name: 'Saltmarsh Records', slug: 'saltmarsh' });
      await db.insert(member).values({
        id: 'mem-saltmarsh',
        organizationId: 'org-saltmarsh',
        userId: 'usr-saltmarsh',
        role: 'admin',
      });
    }
    // Real ids of the demo label's things, one per kind of route parameter.
    const [track] = await db.select().from(tracks).where(eq(tracks.releaseId, 'rel-night-ferries'));
    const [audio] = await db.select().from(audioFiles).limit(1);
    const [pkg] = await db.select().from(packages).where(eq(packages.releaseId, 'rel-signal-hill'));
    const [upload] = await db.select().from(uploads).limit(1);
    const [waiver] = await db.select().from(waivers).limit(1);
    const [invite] = await db.select().from(invitation).limit(1);
    Object.assign(ids, {
      release: 'rel-night-ferries',
      track: track?.id ?? 'no-such-id',
      audio: audio?.id ?? 'no-such-id',
      package: pkg?.id ?? 'no-such-id',
      upload: upload?.id ?? 'no-such-id',
      waiver: waiver?.id ?? 'no-such-id',
      invitation: invite?.id ?? 'no-such-id',
    });
  });

  afterAll(async () => {
    // Other files count the demo's people and labels.
    await db.delete(user).where(eq(user.email, outsider));
    await db.delete(organization).where(eq(organization.id, 'org-saltmarsh'));
  });

  /** The route's URL with the demo label's ids in place of its parameters. */
  function realUrl(file: string): string | null {
    const path = file
      .replace(/^\/src\/pages/, '')
      .replace(/\.ts$/, '')
      .replace(/\/index$/, '');
    const kind = path.startsWith('/api/releases/[id]')
      ? 'release'
      : path.startsWith('/api/audio/')
        ? 'audio'
        : path.startsWith('/api/packages/')
          ? 'package'
          : path.startsWith('/api/tracks/')
            ? 'track'
            : path.startsWith('/api/uploads/')
              ? 'upload'
              : path.startsWith('/api/invitations/')
                ? 'invitation'
                : null;
    if (!kind) return null;
    return path
      .replace('[id]', ids[kind] ?? '')
      .replace('[trackId]', ids.track ?? '')
      .replace('[waiverId]', ids.waiver ?? '');
  }

  it('finds nothing by id: 404 (or 400 for a body it cannot read), never 2xx or 403/409', async () => {
    const before = await db.select().from(releases).where(eq(releases.id, 'rel-night-ferries'));
    const client = await signedIn(outsider, undefined, 'saltmarsh-password');
    const addressed = cases.filter((c) => realUrl(c.file) !== null);
    expect(addressed.length).toBeGreaterThanOrEqual(25);
    for (const c of addressed) {
      const url = realUrl(c.file) ?? '';
      const response = await client.request(c.method, url, c.method === 'GET' ? undefined : {});
      const label = `outsider ${c.method} ${url} → ${response.status}`;
      // Invitations are addressed to a person, not a label: only their addressee may act.
      // 400/415 refuse the request's shape before any lookup, so they reveal nothing.
      const allowed = c.file.includes('/invitations/') ? [400, 403, 404, 415] : [400, 404, 415];
      expect(allowed, label).toContain(response.status);
    }
    const after = await db.select().from(releases).where(eq(releases.id, 'rel-night-ferries'));
    expect(after).toEqual(before);
  });

  it('lists nothing of the demo label', async () => {
    const client = await signedIn(outsider, undefined, 'saltmarsh-password');
    const lists = cases.filter((c) => c.method === 'GET' && realUrl(c.file) === null);
    expect(lists.length).toBeGreaterThanOrEqual(4);
    for (const c of lists) {
      const response = await client.get(c.url);
      const text = await response.text();
      expect(response.status, `${c.url}: ${text.slice(0, 200)}`).toBeLessThan(500);
      for (const secret of [
        'rel-night-ferries',
        'rel-signal-hill',
        'Night Ferries',
        'brackwater.test',
      ]) {
        expect(text, `${c.url} shows ${secret}`).not.toContain(secret);
      }
    }
  });
});
