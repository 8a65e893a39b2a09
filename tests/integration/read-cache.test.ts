/**
 * The server keeps resolved sessions and the release pages' GET answers in memory until the
 * database changes (src/lib/server/read-cache.ts). These tests change the database behind
 * the server's back, from this test process as a script or a second server would, and
 * through the API, and check that the very next answer shows the change: a renamed release,
 * a demoted member, a signed-out session, a revoked share. Each read is made twice first, so
 * the answer being replaced was served from the cache.
 */
import { eq } from 'drizzle-orm';
import { afterEach, describe, expect, inject, it } from 'vitest';
import { releaseDetailSchema, releaseListSchema } from '@/lib/api/schemas';
import { createDatabase } from '@/lib/db/client';
import { member, releaseShares, releases, user } from '@/lib/db/schema';
import { demoEmails, demoPassword, signedIn } from '../support/http';

const db = createDatabase(inject('databaseUrl'));
const baseUrl = inject('baseUrl');
const restore: (() => Promise<unknown>)[] = [];
afterEach(async () => {
  while (restore.length) await restore.pop()?.();
});

async function titleOf(client: Awaited<ReturnType<typeof signedIn>>, id: string) {
  const response = await client.get(`/api/releases/${id}`);
  expect(response.status).toBe(200);
  return releaseDetailSchema.parse(await response.json()).title;
}

async function visibleIds(client: Awaited<ReturnType<typeof signedIn>>) {
  const response = await client.get('/api/releases');
  expect(response.status).toBe(200);
  return releaseListSchema.parse(await response.json()).releases.map((r) => r.id);
}

async function memberRow(email: string) {
  const [row] = await db
    .select({ id: member.id, role: member.role })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(eq(user.email, email));
  if (!row) throw new Error(`no membership for ${email}`);
  return row;
}

describe('read cache', () => {
  it('shows a change committed by another process on the very next read', async () => {
    const engineer = await signedIn(demoEmails.engineer);
    const [before] = await db
      .select({ title: releases.title })
      .from(releases)
      .where(eq(releases.id, 'rel-tideline'));
    expect(await titleOf(engineer, 'rel-tideline')).toBe(before!.title);
    expect(await titleOf(engineer, 'rel-tideline')).toBe(before!.title);

    await db
      .update(releases)
      .set({ title: 'Tideline (cache probe)' })
      .where(eq(releases.id, 'rel-tideline'));
    restore.push(() =>
      db.update(releases).set({ title: before!.title }).where(eq(releases.id, 'rel-tideline')),
    );
    expect(await titleOf(engineer, 'rel-tideline')).toBe('Tideline (cache probe)');
  });

  it('applies a role change to the next request of a signed-in member', async () => {
    const engineer = await signedIn(demoEmails.engineer);
    const all = await visibleIds(engineer);
    expect(all).toContain('rel-night-ferries');
    expect((await engineer.get('/api/releases/rel-night-ferries/workflow')).status).toBe(200);
    expect((await engineer.get('/api/releases/rel-night-ferries/workflow')).status).toBe(200);

    // Demoted to distributor: the label's unshared releases and its findings vanish at once.
    const row = await memberRow(demoEmails.engineer);
    await db.update(member).set({ role: 'distributor' }).where(eq(member.id, row.id));
    restore.push(() => db.update(member).set({ role: row.role }).where(eq(member.id, row.id)));
    expect(await visibleIds(engineer)).not.toContain('rel-night-ferries');
    expect((await engineer.get('/api/releases/rel-night-ferries/workflow')).status).toBe(403);

    await db.update(member).set({ role: row.role }).where(eq(member.id, row.id));
    expect(await visibleIds(engineer)).toEqual(all);
  });

  it('refuses a signed-out session at once, though it was just served', async () => {
    const signIn = await fetch(new URL('/api/auth/sign-in/email', baseUrl), {
      method: 'POST',
      headers: { origin: baseUrl, 'content-type': 'application/json' },
      body: JSON.stringify({ email: demoEmails.coordinator, password: demoPassword }),
    });
    expect(signIn.status).toBe(200);
    const cookie = signIn.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const asCoordinator = (method: string, path: string) =>
      fetch(new URL(path, baseUrl), {
        method,
        headers: { origin: baseUrl, cookie, 'content-type': 'application/json' },
        body: method === 'POST' ? '{}' : undefined,
      });

    expect((await asCoordinator('GET', '/api/releases')).status).toBe(200);
    expect((await asCoordinator('GET', '/api/releases')).status).toBe(200);
    expect((await asCoordinator('POST', '/api/auth/sign-out')).status).toBe(200);
    const after = await asCoordinator('GET', '/api/releases');
    expect(after.status).toBe(401);
  });

  it('shares an answer only among those who see the same releases', async () => {
    const engineer = await signedIn(demoEmails.engineer);
    const coordinator = await signedIn(demoEmails.coordinator);
    const distributor = await signedIn(demoEmails.distributor);
    const fromEngineer = await (await engineer.get('/api/releases/rel-night-ferries')).text();
    expect(await (await coordinator.get('/api/releases/rel-night-ferries')).text()).toBe(
      fromEngineer,
    );
    // Not shared with the distributor: the label's cached answers never reach them.
    expect((await distributor.get('/api/releases/rel-night-ferries')).status).toBe(404);
    expect(await visibleIds(engineer)).toContain('rel-night-ferries');
    expect(await visibleIds(distributor)).not.toContain('rel-night-ferries');
    // The progress panel offers actions by role: each role its own answer.
    const canWaiveAudio = async (client: Awaited<ReturnType<typeof signedIn>>) =>
      (
        (await (await client.get('/api/releases/rel-night-ferries/workflow')).json()) as {
          actions: string[];
          canWaive: { audio: boolean };
        }
      ).canWaive.audio;
    expect(await canWaiveAudio(engineer)).toBe(true);
    expect(await canWaiveAudio(coordinator)).toBe(false);
  });

  it('stops showing a release to the distributor as soon as its share is revoked', async () => {
    const distributor = await signedIn(demoEmails.distributor);
    expect(await visibleIds(distributor)).toContain('rel-signal-hill');
    expect(await visibleIds(distributor)).toContain('rel-signal-hill');
    const shares = await db
      .select()
      .from(releaseShares)
      .where(eq(releaseShares.releaseId, 'rel-signal-hill'));
    expect(shares.length).toBeGreaterThan(0);
    await db.delete(releaseShares).where(eq(releaseShares.releaseId, 'rel-signal-hill'));
    restore.push(() => db.insert(releaseShares).values(shares));
    expect(await visibleIds(distributor)).not.toContain('rel-signal-hill');
    expect((await distributor.get('/api/releases/rel-signal-hill')).status).toBe(404);
  });
});
