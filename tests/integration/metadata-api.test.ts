import { and, eq, inArray } from 'drizzle-orm';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { isrcAllocationResponseSchema, registrantResponseSchema } from '@/lib/api/metadata-schemas';
import { type ReleaseDetail, releaseDetailSchema } from '@/lib/api/schemas';
import { createDatabase } from '@/lib/db/client';
import {
  auditEvents,
  isrcAllocations,
  recordings,
  releaseProfiles,
  releases,
  tracks,
} from '@/lib/db/schema';
import { Client as AnonymousClient, type Client, demoEmails, signedIn } from '../support/http';
import { createFixtureRelease } from './metadata-fixtures';

const db = createDatabase(inject('databaseUrl'));

let admin: Client;
let coordinator: Client;
let engineer: Client;
let distributor: Client;

beforeAll(async () => {
  [admin, coordinator, engineer, distributor] = await Promise.all([
    signedIn(demoEmails.admin),
    signedIn(demoEmails.coordinator),
    signedIn(demoEmails.engineer),
    signedIn(demoEmails.distributor),
  ]);
  const answer = await admin.request('PUT', '/api/registrant', {
    prefix: 'xq-brk',
    rangeStart: 0,
    rangeEnd: 99_999,
  });
  expect(answer.status).toBe(200);
});

async function errorOf(response: Response) {
  return (
    (await response.json()) as {
      error: { code: string; message: string; issues?: { path: string; message: string }[] };
    }
  ).error;
}

async function readRelease(client: Client, id: string): Promise<ReleaseDetail> {
  const response = await client.get(`/api/releases/${id}`);
  expect(response.status).toBe(200);
  return releaseDetailSchema.parse(await response.json());
}

async function auditFor(releaseId: string, action: string) {
  return db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.releaseId, releaseId), eq(auditEvents.action, action)));
}

describe('release form (PATCH /api/releases/:id/metadata)', () => {
  it('a coordinator saves every field; the row, profiles and audit log show it', async () => {
    await createFixtureRelease(db, 'rel-meta-form', { tracks: [{ title: 'One' }] });
    const response = await coordinator.request('PATCH', '/api/releases/rel-meta-form/metadata', {
      version: 1,
      title: '  Low Water  ',
      artist: 'Fixture Artist',
      labelName: 'Brackwater Sound',
      catalogueNumber: 'BWS-099',
      upcEan: '2001234500029',
      releaseDate: '2027-09-03',
      originalReleaseDate: '',
      genre: 'Ambient',
      language: 'EN',
      pLine: '℗ 2027 Brackwater Sound',
      cLine: '2027 Brackwater Sound',
      explicit: true,
      profileIds: ['cd-master', 'streaming-standard'],
    });
    expect(response.status).toBe(200);
    const saved = releaseDetailSchema.parse(await response.json());
    expect(saved.version).toBe(2);
    expect(saved.profiles.map((p) => p.id)).toEqual(['cd-master', 'streaming-standard']);
    const [row] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-form'));
    expect(row).toMatchObject({
      title: 'Low Water',
      upcEan: '2001234500029',
      releaseDate: '2027-09-03',
      originalReleaseDate: null,
      genre: 'Ambient',
      language: 'en',
      pLine: '2027 Brackwater Sound',
      cLine: '2027 Brackwater Sound',
      explicit: true,
      version: 2,
    });
    const profileRows = await db
      .select()
      .from(releaseProfiles)
      .where(eq(releaseProfiles.releaseId, 'rel-meta-form'));
    expect(profileRows.map((p) => p.profileId).sort()).toEqual(['cd-master', 'streaming-standard']);
    const [event] = await auditFor('rel-meta-form', 'release.metadata.update');
    expect(event?.before).toMatchObject({ title: 'Fixture rel-meta-form', upcEan: null });
    expect(event?.after).toMatchObject({ title: 'Low Water', upcEan: '2001234500029' });
  });

  it('refuses a barcode with a wrong check digit, saying which digit is right, and writes nothing', async () => {
    await createFixtureRelease(db, 'rel-meta-bad', { tracks: [] });
    const response = await coordinator.request('PATCH', '/api/releases/rel-meta-bad/metadata', {
      version: 1,
      upcEan: '2001234500028',
      releaseDate: '2027-02-30',
      pLine: 'Brackwater Sound',
      profileIds: ['no-such-profile'],
    });
    expect(response.status).toBe(400);
    const error = await errorOf(response);
    expect(error.code).toBe('invalid_request');
    const byPath = Object.fromEntries((error.issues ?? []).map((i) => [i.path, i.message]));
    expect(byPath.upcEan).toMatch(/check digit for the first 12 digits is 9/);
    expect(byPath.releaseDate).toMatch(/YYYY-MM-DD/);
    expect(byPath.pLine).toMatch(/year, then the owner/);
    const [row] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-bad'));
    expect(row?.version).toBe(1);
    expect(row?.upcEan).toBeNull();

    const unknownProfile = await coordinator.request(
      'PATCH',
      '/api/releases/rel-meta-bad/metadata',
      { version: 1, profileIds: ['no-such-profile'] },
    );
    expect(unknownProfile.status).toBe(400);
    expect((await errorOf(unknownProfile)).issues?.[0]?.message).toMatch(/no-such-profile/);
  });

  it('answers 409 when the version read is stale, and keeps the other edit', async () => {
    await createFixtureRelease(db, 'rel-meta-stale', { tracks: [] });
    const first = await coordinator.request('PATCH', '/api/releases/rel-meta-stale/metadata', {
      version: 1,
      genre: 'Jazz',
    });
    expect(first.status).toBe(200);
    const second = await admin.request('PATCH', '/api/releases/rel-meta-stale/metadata', {
      version: 1,
      genre: 'Folk',
    });
    expect(second.status).toBe(409);
    const error = await errorOf(second);
    expect(error.code).toBe('conflict');
    expect(error.message).toMatch(/Someone else changed this release/);
    const [row] = await db.select().from(releases).where(eq(releases.id, 'rel-meta-stale'));
    expect(row?.genre).toBe('Jazz');
  });

  it.each(['approved', 'packaged', 'delivered'] as const)(
    'an %s release is locked: 409 "reopen first"',
    async (state) => {
      await createFixtureRelease(db, `rel-meta-locked-${state}`, {
        state,
        tracks: [{ title: 'Locked' }],
      });
      const response = await coordinator.request(
        'PATCH',
        `/api/releases/rel-meta-locked-${state}/metadata`,
        { version: 1, genre: 'Jazz' },
      );
      expect(response.status).toBe(409);
      expect((await errorOf(response)).message).toMatch(/reopen it first/);
    },
  );

  it('engineers and distributors get 403, signed-out visitors 401, other labels 404', async () => {
    const body = { version: 1, genre: 'Jazz' };
    for (const client of [engineer, distributor]) {
      const response = await client.request('PATCH', '/api/releases/rel-meta-form/metadata', body);
      expect(response.status).toBe(403);
    }
    const anonymous = await new AnonymousClient().request(
      'PATCH',
      '/api/releases/rel-meta-form/metadata',
      body,
    );
    expect(anonymous.status).toBe(401);
    const missing = await coordinator.request(
      'PATCH',
      '/api/releases/rel-does-not-exist/metadata',
      body,
    );
    expect(missing.status).toBe(404);
  });
});

describe('track form (PATCH /api/releases/:id/tracks/:trackId)', () => {
  it('normalises the ISRC and ISWC, stores credits, bumps the recording version, and audits', async () => {
    const { trackIds, recordingIds } = await createFixtureRelease(db, 'rel-meta-track', {
      tracks: [{ title: 'Brine' }, { title: 'Gull' }],
    });
    const response = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-track/tracks/${trackIds[0]}`,
      {
        recordingVersion: 1,
        title: 'Brine',
        versionTitle: 'Extended Mix',
        isrc: 'isrc qz-9ab-26-00117',
        iswc: 'T-034.524.680-1',
        explicit: true,
        credits: [
          { name: 'Ada Lane', role: 'composer', isni: '0000 0001 2103 2683' },
          { name: 'Bo Reed', role: 'featured-artist' },
        ],
        disc: 2,
        side: 'b',
      },
    );
    expect(response.status).toBe(200);
    const release = releaseDetailSchema.parse(await response.json());
    expect(release.tracks[0]).toMatchObject({
      isrc: 'QZ9AB2600117',
      iswc: 'T0345246801',
      versionTitle: 'Extended Mix',
      disc: 2,
      side: 'B',
      recordingVersion: 2,
    });
    const [rec] = await db.select().from(recordings).where(eq(recordings.id, recordingIds[0]!));
    expect(rec?.credits).toEqual([
      { name: 'Ada Lane', role: 'composer', isni: '0000000121032683' },
      { name: 'Bo Reed', role: 'featured-artist' },
    ]);
    const events = await auditFor('rel-meta-track', 'track.metadata.update');
    expect(events).toHaveLength(1);
    expect(events[0]?.before).toMatchObject({ isrc: null, disc: 1 });
    expect(events[0]?.after).toMatchObject({ isrc: 'QZ9AB2600117', disc: 2, side: 'B' });
  });

  it('says which part of a bad ISRC is wrong (400) and which credit role is unknown', async () => {
    const response = await coordinator.request(
      'PATCH',
      '/api/releases/rel-meta-track/tracks/trk-rel-meta-track-2',
      {
        recordingVersion: 1,
        isrc: 'XQ-BRK-2X-00001',
        credits: [{ name: 'Someone', role: 'tea-maker' }],
      },
    );
    expect(response.status).toBe(400);
    const issues = Object.fromEntries(
      ((await errorOf(response)).issues ?? []).map((i) => [i.path, i.message]),
    );
    expect(issues.isrc).toMatch(/7th character .* must be a digit/);
    expect(issues['credits.0.role']).toMatch(/Choose a role/);
  });

  it('answers 409 on a stale recording version', async () => {
    const first = await coordinator.request(
      'PATCH',
      '/api/releases/rel-meta-track/tracks/trk-rel-meta-track-2',
      { recordingVersion: 1, title: 'Gull (edit)' },
    );
    expect(first.status).toBe(200);
    const stale = await coordinator.request(
      'PATCH',
      '/api/releases/rel-meta-track/tracks/trk-rel-meta-track-2',
      { recordingVersion: 1, title: 'Gull again' },
    );
    expect(stale.status).toBe(409);
    expect((await errorOf(stale)).message).toMatch(/Someone else changed “Gull \(edit\)”/);
  });

  it('an engineer may not edit track metadata (403)', async () => {
    const response = await engineer.request(
      'PATCH',
      '/api/releases/rel-meta-track/tracks/trk-rel-meta-track-2',
      { recordingVersion: 2, isrc: 'XQBRK2699999' },
    );
    expect(response.status).toBe(403);
  });

  it('one ISRC on two different recordings of the label is a 409; one recording on two releases keeps it', async () => {
    const a = await createFixtureRelease(db, 'rel-meta-isrc-a', {
      tracks: [{ title: 'Lighthouse', isrc: 'XQBRK2690001' }],
    });
    const b = await createFixtureRelease(db, 'rel-meta-isrc-b', {
      tracks: [
        { title: 'Different Song' },
        { title: 'Lighthouse', recordingId: a.recordingIds[0] },
      ],
    });
    const clash = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-isrc-b/tracks/${b.trackIds[0]}`,
      { recordingVersion: 1, isrc: 'XQ-BRK-26-90001' },
    );
    expect(clash.status).toBe(409);
    expect((await errorOf(clash)).message).toBe(
      'ISRC XQ-BRK-26-90001 already identifies “Lighthouse” on “Fixture rel-meta-isrc-a”. One ISRC identifies one recording: give this one its own code, or use that recording on this release.',
    );
    const [rec] = await db.select().from(recordings).where(eq(recordings.id, b.recordingIds[0]!));
    expect(rec?.isrc).toBeNull();

    // The shared recording shows its ISRC on both releases, and an edit on one shows on the other.
    const onB = await readRelease(coordinator, 'rel-meta-isrc-b');
    expect(onB.tracks[1]?.isrc).toBe('XQBRK2690001');
    const rename = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-isrc-b/tracks/${b.trackIds[1]}`,
      { recordingVersion: 1, title: 'Lighthouse (Remastered)' },
    );
    expect(rename.status).toBe(200);
    const onA = await readRelease(coordinator, 'rel-meta-isrc-a');
    expect(onA.tracks[0]).toMatchObject({ title: 'Lighthouse (Remastered)', isrc: 'XQBRK2690001' });
  });

  it('a recording that is also on a locked release cannot be changed', async () => {
    const locked = await createFixtureRelease(db, 'rel-meta-shared-locked', {
      state: 'delivered',
      tracks: [{ title: 'Shipped', isrc: 'XQBRK2690002' }],
    });
    const open = await createFixtureRelease(db, 'rel-meta-shared-open', {
      tracks: [{ title: 'Shipped', recordingId: locked.recordingIds[0] }],
    });
    const response = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-shared-open/tracks/${open.trackIds[0]}`,
      { recordingVersion: 1, title: 'Shipped (typo fixed)' },
    );
    expect(response.status).toBe(409);
    expect((await errorOf(response)).message).toMatch(/also on “Fixture rel-meta-shared-locked”/);
  });
});

describe('running order and gaps (PUT /api/releases/:id/order)', () => {
  it('an engineer reorders and sets gaps; positions, version and audit follow', async () => {
    const { trackIds } = await createFixtureRelease(db, 'rel-meta-order', {
      tracks: [{ title: 'A' }, { title: 'B' }, { title: 'C' }],
    });
    const [a, b, c] = trackIds as [string, string, string];
    const response = await engineer.request('PUT', '/api/releases/rel-meta-order/order', {
      version: 1,
      tracks: [
        { id: c, gapBeforeFrames: 0 },
        { id: a, gapBeforeFrames: 150 },
        { id: b, gapBeforeFrames: 75 },
      ],
    });
    expect(response.status).toBe(200);
    const release = releaseDetailSchema.parse(await response.json());
    expect(release.version).toBe(2);
    expect(release.tracks.map((t) => [t.title, t.position, t.gapBeforeFrames])).toEqual([
      ['C', 1, 0],
      ['A', 2, 150],
      ['B', 3, 75],
    ]);
    const [order] = await auditFor('rel-meta-order', 'release.order.update');
    expect((order?.before as { title: string }[] | undefined)?.map((t) => t.title)).toEqual([
      'A',
      'B',
      'C',
    ]);
    expect((order?.after as { title: string }[] | undefined)?.map((t) => t.title)).toEqual([
      'C',
      'A',
      'B',
    ]);
    const [gaps] = await auditFor('rel-meta-order', 'release.gaps.update');
    expect(gaps?.before).toEqual([
      { trackId: c, title: 'C', gapBeforeFrames: 150 },
      { trackId: b, title: 'B', gapBeforeFrames: 150 },
    ]);
    expect(gaps?.after).toEqual([
      { trackId: c, title: 'C', gapBeforeFrames: 0 },
      { trackId: b, title: 'B', gapBeforeFrames: 75 },
    ]);
  });

  it('refuses a list that misses a track (400), a stale version (409) and a coordinator (403)', async () => {
    const ids = ['trk-rel-meta-order-1', 'trk-rel-meta-order-2', 'trk-rel-meta-order-3'];
    const partial = await engineer.request('PUT', '/api/releases/rel-meta-order/order', {
      version: 2,
      tracks: ids.slice(0, 2).map((id) => ({ id, gapBeforeFrames: 0 })),
    });
    expect(partial.status).toBe(400);
    expect((await errorOf(partial)).issues?.[0]?.message).toMatch(/it has 3, the request names 2/);
    const negative = await engineer.request('PUT', '/api/releases/rel-meta-order/order', {
      version: 2,
      tracks: ids.map((id) => ({ id, gapBeforeFrames: -1 })),
    });
    expect(negative.status).toBe(400);
    const stale = await engineer.request('PUT', '/api/releases/rel-meta-order/order', {
      version: 1,
      tracks: ids.map((id) => ({ id, gapBeforeFrames: 0 })),
    });
    expect(stale.status).toBe(409);
    const refused = await coordinator.request('PUT', '/api/releases/rel-meta-order/order', {
      version: 2,
      tracks: ids.map((id) => ({ id, gapBeforeFrames: 0 })),
    });
    expect(refused.status).toBe(403);
    const rows = await db.select().from(tracks).where(inArray(tracks.id, ids));
    expect(rows.map((t) => t.gapBeforeFrames).sort()).toEqual([0, 150, 75].sort());
  });

  it('a locked release keeps its order (409)', async () => {
    const { trackIds } = await createFixtureRelease(db, 'rel-meta-order-locked', {
      state: 'approved',
      tracks: [{ title: 'A' }, { title: 'B' }],
    });
    const response = await engineer.request('PUT', '/api/releases/rel-meta-order-locked/order', {
      version: 1,
      tracks: [...trackIds].reverse().map((id) => ({ id, gapBeforeFrames: 0 })),
    });
    expect(response.status).toBe(409);
    expect((await errorOf(response)).message).toMatch(/reopen it first/);
  });
});

describe('ISRC registrant and allocation', () => {
  it('only an admin sets the registrant prefix; a bad one is a 400', async () => {
    const refused = await coordinator.request('PUT', '/api/registrant', {
      prefix: 'XQBRK',
      rangeStart: 0,
      rangeEnd: 99_999,
    });
    expect(refused.status).toBe(403);
    const bad = await admin.request('PUT', '/api/registrant', {
      prefix: 'X1BRK',
      rangeStart: 10,
      rangeEnd: 5,
    });
    expect(bad.status).toBe(400);
    const paths = ((await errorOf(bad)).issues ?? []).map((i) => i.path);
    expect(paths).toContain('prefix');
    const info = registrantResponseSchema.parse(
      await (await coordinator.get('/api/registrant')).json(),
    );
    expect(info.registrant).toEqual({ prefix: 'XQBRK', rangeStart: 0, rangeEnd: 99_999 });
    expect(info.nextIsrc).toMatch(/^XQBRK\d{7}$/);
    expect((await engineer.get('/api/registrant')).status).toBe(403);
  });

  it('allocates the next codes in running order, never twice, and never reuses a cleared one', async () => {
    const { trackIds, recordingIds } = await createFixtureRelease(db, 'rel-meta-alloc', {
      tracks: [{ title: 'One' }, { title: 'Two', isrc: 'XQBRK2690003' }, { title: 'Three' }],
    });
    const info = registrantResponseSchema.parse(
      await (await coordinator.get('/api/registrant')).json(),
    );
    const first = Number(info.nextIsrc!.slice(7));
    const stem = info.nextIsrc!.slice(0, 7);
    const code = (n: number) => `${stem}${String(n).padStart(5, '0')}`;
    // XQBRK2690003 was typed by hand under our prefix: it is above every seeded code, so
    // the next free designation is after it.
    expect(info.nextIsrc).toBe(code(first));

    const response = await coordinator.post('/api/releases/rel-meta-alloc/isrc-allocations', {});
    expect(response.status).toBe(201);
    const result = isrcAllocationResponseSchema.parse(await response.json());
    expect(result.allocated).toEqual([
      { trackId: trackIds[0], isrc: code(first) },
      { trackId: trackIds[2], isrc: code(first + 1) },
    ]);
    expect(result.release.tracks.map((t) => t.isrc)).toEqual([
      code(first),
      'XQBRK2690003',
      code(first + 1),
    ]);
    const allocations = await db
      .select()
      .from(isrcAllocations)
      .where(inArray(isrcAllocations.isrc, [code(first), code(first + 1)]));
    expect(allocations.map((a) => a.recordingId).sort()).toEqual(
      [recordingIds[0], recordingIds[2]].sort(),
    );
    expect(await auditFor('rel-meta-alloc', 'track.isrc.allocate')).toHaveLength(2);

    // Nothing left to allocate: 200 with an empty list.
    const again = await coordinator.post('/api/releases/rel-meta-alloc/isrc-allocations', {});
    expect(again.status).toBe(200);
    expect(isrcAllocationResponseSchema.parse(await again.json()).allocated).toEqual([]);

    // A track that has one already: 409.
    const has = await coordinator.post('/api/releases/rel-meta-alloc/isrc-allocations', {
      trackIds: [trackIds[0]],
    });
    expect(has.status).toBe(409);

    // Clear the first code, allocate again: a new code, not the cleared one.
    const clear = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-alloc/tracks/${trackIds[0]}`,
      { recordingVersion: 2, isrc: '' },
    );
    expect(clear.status).toBe(200);
    const realloc = await coordinator.post('/api/releases/rel-meta-alloc/isrc-allocations', {
      trackIds: [trackIds[0]],
    });
    expect(realloc.status).toBe(201);
    const next = isrcAllocationResponseSchema.parse(await realloc.json()).allocated[0]?.isrc;
    expect(next).toBe(code(first + 2));

    // Typing the cleared code onto another recording: it was handed out, so 409.
    const reuse = await coordinator.request(
      'PATCH',
      `/api/releases/rel-meta-alloc/tracks/${trackIds[1]}`,
      { recordingVersion: 1, isrc: code(first) },
    );
    expect(reuse.status).toBe(409);
    expect((await errorOf(reuse)).message).toMatch(/never reused/);
  });

  it('many parallel allocations never hand out one code twice', async () => {
    const count = 12;
    const { trackIds } = await createFixtureRelease(db, 'rel-meta-parallel', {
      tracks: Array.from({ length: count }, (_, i) => ({ title: `Parallel ${i + 1}` })),
    });
    const answers = await Promise.all(
      trackIds.map((id) =>
        coordinator.post('/api/releases/rel-meta-parallel/isrc-allocations', { trackIds: [id] }),
      ),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(count).fill(201));
    const codes = (
      await Promise.all(
        answers.map(async (a) => isrcAllocationResponseSchema.parse(await a.json())),
      )
    ).map((r) => r.allocated[0]!.isrc);
    expect(new Set(codes).size).toBe(count);
    const numbers = codes.map((c) => Number(c.slice(7))).sort((x, y) => x - y);
    expect(numbers.at(-1)! - numbers[0]!).toBe(count - 1);
    const rows = await db
      .select()
      .from(isrcAllocations)
      .where(inArray(isrcAllocations.isrc, codes));
    expect(rows).toHaveLength(count);
  });

  it('engineers may not allocate (403); a locked release may not be given codes (409)', async () => {
    const refused = await engineer.post('/api/releases/rel-meta-alloc/isrc-allocations', {});
    expect(refused.status).toBe(403);
    await createFixtureRelease(db, 'rel-meta-alloc-locked', {
      state: 'packaged',
      tracks: [{ title: 'No code' }],
    });
    const locked = await coordinator.post(
      '/api/releases/rel-meta-alloc-locked/isrc-allocations',
      {},
    );
    expect(locked.status).toBe(409);
  });
});
