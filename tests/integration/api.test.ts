import { createHash } from 'node:crypto';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import { eq, inArray } from 'drizzle-orm';
import { describe, expect, inject, it } from 'vitest';
import { releaseDetailSchema, releaseListSchema } from '@/lib/api/schemas';
import { createDatabase } from '@/lib/db/client';
import {
  audioFiles,
  member,
  organization,
  recordings,
  releases,
  tracks,
  user,
} from '@/lib/db/schema';
import { createS3Client } from '@/lib/storage/s3';
import { Client, demoEmails, signedIn } from '../support/http';

const db = createDatabase(inject('databaseUrl'));

const demoReleaseIds = ['rel-night-ferries', 'rel-signal-hill', 'rel-tideline'];

/** Titles of the demo releases the client sees (other tests add releases of their own). */
async function releaseTitles(client: Client): Promise<string[]> {
  const response = await client.get('/api/releases');
  expect(response.status).toBe(200);
  return releaseListSchema
    .parse(await response.json())
    .releases.filter((r) => demoReleaseIds.includes(r.id))
    .map((r) => r.title)
    .sort();
}

describe('signed-out requests', () => {
  it('answers 401 with a JSON error on the API', async () => {
    const response = await new Client().get('/api/releases');
    expect(response.status).toBe(401);
    expect(await response.json()).toEqual({
      error: { code: 'unauthenticated', message: 'Sign in to continue.' },
    });
  });

  it('sends pages to sign-in, keeping where the visitor was going', async () => {
    const response = await new Client().get('/releases/rel-night-ferries');
    expect(response.status).toBe(302);
    expect(response.headers.get('location')).toBe('/sign-in?next=%2Freleases%2Frel-night-ferries');
  });

  it('refuses a wrong password and offers no public sign-up', async () => {
    const client = new Client();
    const wrong = await client.post('/api/auth/sign-in/email', {
      email: demoEmails.admin,
      password: 'not-the-password',
    });
    expect(wrong.status).toBe(401);
    const signUp = await client.post('/api/auth/sign-up/email', {
      email: 'stranger@example.test',
      password: 'long-enough-password',
      name: 'Stranger',
    });
    expect(signUp.status).toBe(404);
    const rows = await db.select().from(user).where(eq(user.email, 'stranger@example.test'));
    expect(rows).toEqual([]);
  });
});

describe('what each role sees', () => {
  const everything = ['Night Ferries', 'Signal Hill', 'Tideline'];

  it.each([
    ['admin', everything],
    ['engineer', everything],
    ['coordinator', everything],
    ['distributor', ['Signal Hill']],
  ] as const)('%s sees %j', async (role, titles) => {
    const client = await signedIn(demoEmails[role]);
    expect(await releaseTitles(client)).toEqual(titles);
  });

  it('a release lists its tracks in order with their ISRCs and audio facts', async () => {
    const client = await signedIn(demoEmails.engineer);
    const response = await client.get('/api/releases/rel-night-ferries');
    expect(response.status).toBe(200);
    const release = releaseDetailSchema.parse(await response.json());
    expect(release.tracks.map((t) => [t.position, t.title, t.isrc])).toEqual([
      [1, 'Harbour Lights', 'XQBRK2600001'],
      [2, 'Customs House', 'XQBRK2600002'],
      [3, 'The Long Swell', 'XQBRK2600003'],
      [4, 'Tender to Shore', 'XQBRK2600004'],
    ]);
    expect(release.tracks[1]?.audio?.sampleRateHz).toBe(48_000);
    expect(release.trackCount).toBe(4);
    expect(release.totalDurationSeconds).toBeCloseTo(12 + 10 + 14 + 11, 6);
  });

  it('a distributor gets 404 for a release not shared with it', async () => {
    const client = await signedIn(demoEmails.distributor);
    expect((await client.get('/api/releases/rel-night-ferries')).status).toBe(404);
    expect((await client.get('/api/releases/rel-signal-hill')).status).toBe(200);
  });

  it('a role without the permission gets 403', async () => {
    for (const role of ['engineer', 'coordinator', 'distributor'] as const) {
      const client = await signedIn(demoEmails[role]);
      const response = await client.get('/api/members');
      expect(response.status, role).toBe(403);
      expect(((await response.json()) as { error: { code: string } }).error.code).toBe('forbidden');
    }
    const admin = await signedIn(demoEmails.admin);
    expect((await admin.get('/api/members')).status).toBe(200);
  });

  it("another organisation's release is 404, not 403", async () => {
    await db
      .insert(organization)
      .values({ id: 'org-other', name: 'Other Label', slug: 'other-label' });
    await db.insert(releases).values({
      id: 'rel-other',
      organizationId: 'org-other',
      title: 'Not Yours',
      artist: 'Someone Else',
      labelName: 'Other Label',
    });
    const admin = await signedIn(demoEmails.admin);
    const response = await admin.get('/api/releases/rel-other');
    expect(response.status).toBe(404);
    const all = releaseListSchema.parse(await (await admin.get('/api/releases')).json());
    expect(all.releases.map((r) => r.title)).not.toContain('Not Yours');
  });
});

describe('demo audio in the S3 fake', () => {
  it('every seeded file is stored byte for byte (SHA-256 matches the database)', async () => {
    const { endpoint, bucket } = inject('s3');
    const s3 = createS3Client({
      endpoint,
      bucket,
      region: 'us-east-1',
      accessKeyId: 'S3RVER',
      secretAccessKey: 'S3RVER',
    });
    const demoRecording = /^rec-(night-ferries|tideline|signal-hill)-\d$/;
    const rows = (await db.select().from(audioFiles)).filter((r) =>
      demoRecording.test(r.recordingId),
    );
    expect(rows.length).toBe(9);
    for (const row of rows) {
      const answer = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: row.objectKey }));
      const bytes = Buffer.from(
        await (
          answer.Body as { transformToByteArray(): Promise<Uint8Array> }
        ).transformToByteArray(),
      );
      expect(bytes.length, row.objectKey).toBe(row.sizeBytes);
      expect(createHash('sha256').update(bytes).digest('hex'), row.objectKey).toBe(row.sha256);
      // A RIFF/WAVE header proves the object is the audio, not SDK chunk framing.
      expect(bytes.subarray(0, 4).toString('latin1')).toBe('RIFF');
      expect(bytes.subarray(8, 12).toString('latin1')).toBe('WAVE');
    }
  });

  it('tracks reference recordings of the same organisation', async () => {
    const rows = await db
      .select({ trackOrg: releases.organizationId, recOrg: recordings.organizationId })
      .from(tracks)
      .innerJoin(releases, eq(releases.id, tracks.releaseId))
      .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
      .where(inArray(tracks.releaseId, demoReleaseIds));
    expect(rows.length).toBe(9);
    for (const row of rows) expect(row.trackOrg).toBe(row.recOrg);
  });
});

interface StoredMail {
  to: string[];
  subject: string;
  text: string;
}

async function mailTo(address: string): Promise<StoredMail[]> {
  const answer = await fetch(new URL('/messages', inject('mailUrl')));
  const { messages } = (await answer.json()) as { messages: StoredMail[] };
  return messages.filter((m) => m.to.includes(address));
}

describe('joining by invitation', () => {
  it('admin invites, the mail arrives, accepting sets a password and signs in with the role', async () => {
    const admin = await signedIn(demoEmails.admin);
    const email = 'new.engineer@brackwater.test';
    const invited = await admin.post('/api/members/invitations', { email, role: 'engineer' });
    expect(invited.status).toBe(201);

    const [mail] = await mailTo(email);
    expect(mail?.subject).toBe('You are invited to Brackwater Sound on Quayside');
    const link = /https?:\/\/\S+\/invite\/(\S+)/.exec(mail?.text ?? '');
    expect(link).not.toBeNull();
    const invitationId = link?.[1] ?? '';

    const visitor = new Client();
    const tooShort = await visitor.post(`/api/invitations/${invitationId}/accept`, {
      name: 'Sam',
      password: 'short',
    });
    expect(tooShort.status).toBe(400);

    const accepted = await visitor.post(`/api/invitations/${invitationId}/accept`, {
      name: 'Sam Fenwick',
      password: 'a-long-enough-password',
    });
    expect(accepted.status).toBe(200);
    // Signed in straight away, as an engineer of the label.
    expect(await releaseTitles(visitor)).toEqual(['Night Ferries', 'Signal Hill', 'Tideline']);
    expect((await visitor.get('/api/members')).status).toBe(403);

    const [row] = await db
      .select({ role: member.role })
      .from(member)
      .innerJoin(user, eq(user.id, member.userId))
      .where(eq(user.email, email));
    expect(row?.role).toBe('engineer');

    const again = await new Client().post(`/api/invitations/${invitationId}/accept`, {
      name: 'Someone',
      password: 'another-long-password',
    });
    expect(again.status).toBe(409);

    const fresh = new Client();
    await fresh.signIn(email, 'a-long-enough-password');
    expect((await fresh.get('/api/releases')).status).toBe(200);
  });

  it('only an admin may invite, and bad input is refused with the reason', async () => {
    const coordinator = await signedIn(demoEmails.coordinator);
    const refused = await coordinator.post('/api/members/invitations', {
      email: 'x@brackwater.test',
      role: 'engineer',
    });
    expect(refused.status).toBe(403);
    expect(await mailTo('x@brackwater.test')).toEqual([]);

    const admin = await signedIn(demoEmails.admin);
    const badRole = await admin.post('/api/members/invitations', {
      email: 'y@brackwater.test',
      role: 'owner',
    });
    expect(badRole.status).toBe(400);
    const body = (await badRole.json()) as { error: { code: string; issues: { path: string }[] } };
    expect(body.error.code).toBe('invalid_request');
    expect(body.error.issues.map((i) => i.path)).toEqual(['role']);

    const notJson = await admin.request('POST', '/api/members/invitations', 'email=y', {
      'content-type': 'text/plain',
    });
    expect(notJson.status, await notJson.clone().text()).toBe(415);

    const existing = await admin.post('/api/members/invitations', {
      email: demoEmails.engineer,
      role: 'engineer',
    });
    expect(existing.status).toBe(409);
  });

  it('an unknown invitation is 404', async () => {
    const response = await new Client().get('/api/invitations/does-not-exist');
    expect(response.status).toBe(404);
  });
});
