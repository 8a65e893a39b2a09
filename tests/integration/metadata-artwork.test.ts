import { createHash } from 'node:crypto';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { artworkResponseSchema } from '@/lib/api/metadata-schemas';
import { createDatabase } from '@/lib/db/client';
import { artworks, auditEvents } from '@/lib/db/schema';
import { createS3Client } from '@/lib/storage/s3';
import { demoEmails, demoPassword } from '../support/http';
import { makePng } from '../unit/metadata/images';
import { createFixtureRelease } from './metadata-fixtures';

const db = createDatabase(inject('databaseUrl'));
const baseUrl = inject('baseUrl');

/** Signs in and returns the session cookie: the shared client only sends JSON bodies. */
async function sessionCookie(email: string): Promise<string> {
  const response = await fetch(new URL('/api/auth/sign-in/email', baseUrl), {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: baseUrl },
    body: JSON.stringify({ email, password: demoPassword }),
  });
  expect(response.status).toBe(200);
  return response.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
}

function postArtwork(cookie: string, releaseId: string, bytes: Buffer, type = 'image/png') {
  return fetch(new URL(`/api/releases/${releaseId}/artwork`, baseUrl), {
    method: 'POST',
    headers: { cookie, origin: baseUrl, 'content-type': type, 'x-file-name': 'front%20cover.png' },
    body: new Uint8Array(bytes),
  });
}

let coordinator: string;
const good = makePng(3000, 3000, 2);

beforeAll(async () => {
  coordinator = await sessionCookie(demoEmails.coordinator);
  await createFixtureRelease(db, 'rel-meta-art', { tracks: [] });
  await createFixtureRelease(db, 'rel-meta-art-locked', { state: 'delivered', tracks: [] });
});

describe('cover art upload', () => {
  it('stores a square RGB PNG in S3 byte for byte, records it and audits it', async () => {
    const response = await postArtwork(coordinator, 'rel-meta-art', good);
    expect(response.status).toBe(201);
    const { artwork } = artworkResponseSchema.parse(await response.json());
    expect(artwork).toMatchObject({
      originalName: 'front cover.png',
      format: 'png',
      widthPx: 3000,
      heightPx: 3000,
      sizeBytes: good.length,
      sha256: createHash('sha256').update(good).digest('hex'),
    });
    const [row] = await db.select().from(artworks).where(eq(artworks.releaseId, 'rel-meta-art'));
    const { endpoint, bucket } = inject('s3');
    const s3 = createS3Client({
      endpoint,
      bucket,
      region: 'us-east-1',
      accessKeyId: 'S3RVER',
      secretAccessKey: 'S3RVER',
    });
    const stored = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: row!.objectKey }));
    const bytes = Buffer.from(
      await (stored.Body as { transformToByteArray(): Promise<Uint8Array> }).transformToByteArray(),
    );
    expect(bytes.equals(good)).toBe(true);
    const events = await db
      .select()
      .from(auditEvents)
      .where(eq(auditEvents.action, 'release.artwork.upload'));
    expect(events.some((e) => e.releaseId === 'rel-meta-art')).toBe(true);

    // The image is served back to anyone who may read the release.
    const image = await fetch(new URL(artwork!.url, baseUrl), { headers: { cookie: coordinator } });
    expect(image.status).toBe(200);
    expect(image.headers.get('content-type')).toBe('image/png');
    expect(Buffer.from(await image.arrayBuffer()).equals(good)).toBe(true);
  });

  it.each([
    [makePng(1400, 1400), /at least 3000 × 3000 pixels; this image is 1400 × 1400/],
    [makePng(3000, 3001), /must be square/],
    [makePng(3000, 3000, 6), /transparency channel/],
  ])(
    'refuses a file that does not meet the rules with a plain reason (%#)',
    async (bytes, reason) => {
      const response = await postArtwork(coordinator, 'rel-meta-art', bytes);
      expect(response.status).toBe(400);
      expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(
        reason,
      );
    },
  );

  it('refuses other content types (415), engineers (403), signed-out (401) and locked releases (409)', async () => {
    expect((await postArtwork(coordinator, 'rel-meta-art', good, 'image/gif')).status).toBe(415);
    const engineer = await sessionCookie(demoEmails.engineer);
    expect((await postArtwork(engineer, 'rel-meta-art', good)).status).toBe(403);
    expect((await postArtwork('', 'rel-meta-art', good)).status).toBe(401);
    const locked = await postArtwork(coordinator, 'rel-meta-art-locked', good);
    expect(locked.status).toBe(409);
    const rows = await db
      .select()
      .from(artworks)
      .where(eq(artworks.releaseId, 'rel-meta-art-locked'));
    expect(rows).toEqual([]);
  });
});
