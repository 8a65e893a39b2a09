import { createHash } from 'node:crypto';
import { GetObjectCommand, HeadObjectCommand } from '@aws-sdk/client-s3';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trackDetailSchema, uploadResultSchema } from '@/lib/api/schemas';
import { audioFiles, auditEvents, tracks, uploads } from '@/lib/db/schema';
import { demoEmails } from '../support/http';
import {
  createFixtureRelease,
  db,
  removeFixtureRelease,
  Session,
  sineFrames,
  sineWav,
  startPartialUpload,
  testS3,
  uploadPath,
  uploadStatus,
  waitForAnalyses,
  wavHeader,
} from './upload-support';

const s3 = testS3();
const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');

async function storedBytes(key: string): Promise<Buffer> {
  const answer = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: key }));
  return Buffer.from(
    await (answer.Body as { transformToByteArray(): Promise<Uint8Array> }).transformToByteArray(),
  );
}

async function objectExists(key: string): Promise<boolean> {
  try {
    await s3.client.send(new HeadObjectCommand({ Bucket: s3.bucket, Key: key }));
    return true;
  } catch {
    return false;
  }
}

async function rowCounts(releaseId: string) {
  const trackRows = await db.select().from(tracks).where(eq(tracks.releaseId, releaseId));
  const uploadRows = await db.select().from(uploads).where(eq(uploads.releaseId, releaseId));
  return { tracks: trackRows.length, uploads: uploadRows.length };
}

let engineer: Session;

beforeAll(async () => {
  engineer = await Session.signIn(demoEmails.engineer);
});

afterAll(async () => {
  for (const id of ['rel-upload-api', 'rel-upload-refusals', 'rel-upload-drops']) {
    await removeFixtureRelease(id);
  }
});

describe('uploading a new track and replacing its file', () => {
  const releaseId = 'rel-upload-api';
  // 997 Hz at −20 dBFS peak in both channels: BS.1770-4 gives −3.01 LKFS for a 0 dBFS 1 kHz
  // sine in one channel, so two channels at −20 dBFS read −20.0 LUFS; true peak −20 dBTP.
  const first = sineWav({ seconds: 10, sampleRateHz: 48_000, bits: 24, peakDbfs: -20 });
  const second = sineWav({ seconds: 4, sampleRateHz: 44_100, bits: 16, peakDbfs: -10 });
  let trackId = '';
  let firstFileId = '';

  beforeAll(async () => {
    await createFixtureRelease(releaseId, ['broadcast-r128']);
  });

  it('stores the bytes unchanged, creates the track from the file name and audits it', async () => {
    const response = await engineer.upload(releaseId, first, { name: '03 Salt_Marsh.wav' });
    expect(response.status).toBe(201);
    const result = uploadResultSchema.parse(await response.json());
    expect(result.sha256).toBe(sha256(first));
    expect(result.sizeBytes).toBe(first.length);
    expect(result.fileVersion).toBe(1);
    trackId = result.trackId;
    firstFileId = result.audioFileId;

    const [track] = await db.select().from(tracks).where(eq(tracks.id, trackId));
    expect(track?.position).toBe(1);
    const [file] = await db.select().from(audioFiles).where(eq(audioFiles.id, firstFileId));
    expect(file?.originalName).toBe('03 Salt_Marsh.wav');
    expect(file?.objectKey).not.toContain('Salt');
    expect(file?.sha256).toBe(sha256(first));
    const stored = await storedBytes(file?.objectKey ?? '');
    expect(sha256(stored)).toBe(sha256(first));

    const [uploadRow] = await db.select().from(uploads).where(eq(uploads.id, result.uploadId));
    expect(uploadRow).toMatchObject({
      state: 'stored',
      audioFileId: firstFileId,
      bytesReceived: first.length,
    });
    const events = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.releaseId, releaseId), eq(auditEvents.action, 'audio.uploaded')));
    expect(events).toHaveLength(1);

    const status = await uploadStatus(engineer, releaseId);
    expect(status.tracks.map((t) => [t.position, t.title])).toEqual([[1, 'Salt Marsh']]);
  });

  it('analyses the stored file in the background and keeps plausible measurements', async () => {
    const status = await waitForAnalyses(engineer, releaseId);
    expect(status.tracks[0]?.current?.analysisState).toBe('done');
    const response = await engineer.get(`/api/tracks/${trackId}`);
    expect(response.status).toBe(200);
    const detail = trackDetailSchema.parse(await response.json());
    const m = detail.measurements;
    expect(m?.format).toMatchObject({ sampleRateHz: 48_000, bitsPerSample: 24, channels: 2 });
    expect(m?.format.durationSeconds).toBeCloseTo(10, 6);
    expect(m?.loudness.integratedLufs).toBeCloseTo(-20, 1);
    expect(m?.loudness.truePeakDbtp).toBeGreaterThan(-20.1);
    expect(m?.loudness.truePeakDbtp).toBeLessThan(-19.9);
    expect(m?.correlation.identicalChannels).toBe(true);
    expect(m?.series.waveform.max.length).toBeGreaterThan(100);
    expect(detail.loudnessTarget).toEqual({
      profileName: 'Broadcast, EBU R 128',
      minLufs: -24,
      maxLufs: -22,
    });
    expect(detail.current?.durationSeconds).toBeCloseTo(10, 6);
  });

  it('replacing keeps version 1, makes version 2 current and re-analyses it', async () => {
    const response = await engineer.upload(releaseId, second, {
      name: 'Salt Marsh v2.wav',
      trackId,
    });
    expect(response.status).toBe(201);
    const result = uploadResultSchema.parse(await response.json());
    expect(result.fileVersion).toBe(2);
    expect(result.trackId).toBe(trackId);
    await waitForAnalyses(engineer, releaseId);
    const detail = trackDetailSchema.parse(
      await (await engineer.get(`/api/tracks/${trackId}`)).json(),
    );
    expect(detail.versions.map((v) => [v.fileVersion, v.originalName])).toEqual([
      [2, 'Salt Marsh v2.wav'],
      [1, '03 Salt_Marsh.wav'],
    ]);
    expect(detail.current?.id).toBe(result.audioFileId);
    expect(detail.measurements?.format.sampleRateHz).toBe(44_100);
    expect(detail.measurements?.loudness.integratedLufs).toBeCloseTo(-10, 1);
    const [old] = await db.select().from(audioFiles).where(eq(audioFiles.id, firstFileId));
    expect(sha256(await storedBytes(old?.objectKey ?? ''))).toBe(sha256(first));
    const replaced = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.releaseId, releaseId), eq(auditEvents.action, 'audio.replaced')));
    expect(replaced[0]?.before).toEqual({ trackId, fileVersion: 1 });
  });

  it('plays through Range requests: 206 with the right bytes, open ranges capped at 2 MiB', async () => {
    const [file] = await db.select().from(audioFiles).where(eq(audioFiles.id, firstFileId));
    const url = `/api/audio/${firstFileId}/stream`;
    const part = await engineer.get(url, { range: 'bytes=100-1099' });
    expect(part.status).toBe(206);
    expect(part.headers.get('content-range')).toBe(`bytes 100-1099/${first.length}`);
    expect(Buffer.from(await part.arrayBuffer()).equals(first.subarray(100, 1100))).toBe(true);

    const open = await engineer.get(url, { range: 'bytes=0-' });
    expect(open.status).toBe(206);
    const cap = 2 * 1024 * 1024;
    expect(open.headers.get('content-range')).toBe(`bytes 0-${cap - 1}/${first.length}`);
    expect(Buffer.from(await open.arrayBuffer()).equals(first.subarray(0, cap))).toBe(true);

    const tail = await engineer.get(url, { range: 'bytes=-10' });
    expect(Buffer.from(await tail.arrayBuffer()).equals(first.subarray(first.length - 10))).toBe(
      true,
    );
    expect((await engineer.get(url, { range: `bytes=${first.length}-` })).status).toBe(416);
    expect(file?.sizeBytes).toBe(first.length);

    const coordinator = await Session.signIn(demoEmails.coordinator);
    expect((await coordinator.get(url, { range: 'bytes=0-9' })).status).toBe(206);
    const distributor = await Session.signIn(demoEmails.distributor);
    expect((await distributor.get(url, { range: 'bytes=0-9' })).status).toBe(403);
  });

  it('offers every version for download through a short-lived storage URL', async () => {
    const response = await engineer.get(`/api/audio/${firstFileId}/download`);
    expect(response.status).toBe(302);
    const location = response.headers.get('location') ?? '';
    const stored = Buffer.from(await (await fetch(location)).arrayBuffer());
    expect(sha256(stored)).toBe(sha256(first));
    const coordinator = await Session.signIn(demoEmails.coordinator);
    expect((await coordinator.get(`/api/audio/${firstFileId}/download`)).status).toBe(403);
  });
});

describe('refusals store nothing', () => {
  const releaseId = 'rel-upload-refusals';

  beforeAll(async () => {
    await createFixtureRelease(releaseId);
  });

  it('refuses a renamed text file with 415 and a clear message', async () => {
    const body = Buffer.from('title,isrc\nSalt Marsh,XQBRK2600099\n'.repeat(50));
    const response = await engineer.upload(releaseId, body, { name: 'master.wav' });
    expect(response.status).toBe(415);
    const error = (await response.json()) as { error: { message: string } };
    expect(error.error.message).toMatch(/text file.*WAV/);
    expect(await rowCounts(releaseId)).toEqual({ tracks: 0, uploads: 0 });
  });

  it('refuses FLAC and MP3 by their content, whatever the extension', async () => {
    for (const [magic, word] of [
      ['fLaC', 'FLAC'],
      ['ID3\u0004', 'MP3'],
    ] as const) {
      const body = Buffer.concat([Buffer.from(magic, 'latin1'), Buffer.alloc(2000, 1)]);
      const response = await engineer.upload(releaseId, body, { name: 'master.wav' });
      expect(response.status).toBe(415);
      expect(((await response.json()) as { error: { message: string } }).error.message).toContain(
        word,
      );
    }
    expect(await rowCounts(releaseId)).toEqual({ tracks: 0, uploads: 0 });
  });

  it('refuses a declared size over the limit with 413 before reading it', async () => {
    const partial = await startPartialUpload({
      path: uploadPath(releaseId, { uploadId: crypto.randomUUID(), name: 'huge.wav' }),
      cookie: engineer.cookie,
      declaredBytes: 6 * 1024 ** 3,
      first: wavHeader({
        sampleRateHz: 48_000,
        bits: 24,
        channels: 2,
        dataBytes: 6 * 1024 ** 3 - 44,
      }),
    });
    expect(await partial.response).toBe(413);
    partial.drop();
    expect(await rowCounts(releaseId)).toEqual({ tracks: 0, uploads: 0 });
  });

  it('keeps a hostile name only as clean display text, never in the object key', async () => {
    const body = sineWav({ seconds: 1 });
    const response = await engineer.upload(releaseId, body, {
      name: '../../etc/\u0000evil\u202e\u0007 name.wav',
    });
    expect(response.status).toBe(201);
    const result = uploadResultSchema.parse(await response.json());
    expect(result.originalName).toBe('evil name.wav');
    const [file] = await db.select().from(audioFiles).where(eq(audioFiles.id, result.audioFileId));
    expect(file?.objectKey).toMatch(/^audio\/[^/]+\/[0-9a-f-]{36}\.wav$/);
    const dots = await engineer.upload(releaseId, body, { name: '../..' });
    expect(dots.status).toBe(400);
    expect(await rowCounts(releaseId)).toEqual({ tracks: 1, uploads: 1 });
  });

  it('checks the role and the session: coordinator 403, signed out 401', async () => {
    const body = sineWav({ seconds: 1 });
    const coordinator = await Session.signIn(demoEmails.coordinator);
    expect((await coordinator.upload(releaseId, body, { name: 'a.wav' })).status).toBe(403);
    expect((await new Session().upload(releaseId, body, { name: 'a.wav' })).status).toBe(401);
    expect((await coordinator.get(`/api/releases/${releaseId}/uploads`)).status).toBe(403);
    expect((await engineer.upload('rel-does-not-exist', body, { name: 'a.wav' })).status).toBe(404);
  });
});

describe('a dropped or cancelled upload loses nothing', () => {
  const releaseId = 'rel-upload-drops';
  const original = sineWav({ seconds: 2 });
  let trackId = '';
  let originalFileId = '';

  beforeAll(async () => {
    await createFixtureRelease(releaseId);
    const response = await engineer.upload(releaseId, original, { name: 'Keeper.wav' });
    const result = uploadResultSchema.parse(await response.json());
    trackId = result.trackId;
    originalFileId = result.audioFileId;
  });

  async function expectOriginalCurrent(uploadId: string, state: 'failed' | 'cancelled') {
    await expect
      .poll(
        async () => (await db.select().from(uploads).where(eq(uploads.id, uploadId)))[0]?.state,
        {
          timeout: 10_000,
        },
      )
      .toBe(state);
    const [row] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
    expect(row?.audioFileId).toBeNull();
    expect(await objectExists(row?.objectKey ?? '')).toBe(false);
    const status = await uploadStatus(engineer, releaseId);
    expect(status.tracks).toHaveLength(1);
    expect(status.tracks[0]?.current?.id).toBe(originalFileId);
    expect(status.tracks[0]?.versionCount).toBe(1);
  }

  it('a connection dropped half-way leaves the previous version current and no object', async () => {
    const uploadId = crypto.randomUUID();
    const frames = 48_000 * 60;
    const dataBytes = frames * 6;
    const firstPart = Buffer.concat([
      wavHeader({ sampleRateHz: 48_000, bits: 24, channels: 2, dataBytes }),
      sineFrames({
        sampleRateHz: 48_000,
        bits: 24,
        channels: 2,
        hz: 997,
        peakDbfs: -20,
        from: 0,
        count: frames / 2,
      }),
    ]);
    const partial = await startPartialUpload({
      path: uploadPath(releaseId, { uploadId, name: 'Keeper v2.wav', trackId }),
      cookie: engineer.cookie,
      declaredBytes: 44 + dataBytes,
      first: firstPart,
    });
    await expect
      .poll(async () => (await db.select().from(uploads).where(eq(uploads.id, uploadId))).length)
      .toBe(1);
    partial.drop();
    await expectOriginalCurrent(uploadId, 'failed');
    const [row] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
    expect(row?.error).toMatch(/connection dropped/);
  });

  it('a cancelled upload ends cancelled and the same file can be sent again', async () => {
    const uploadId = crypto.randomUUID();
    const replacement = sineWav({ seconds: 30, peakDbfs: -12 });
    const partial = await startPartialUpload({
      path: uploadPath(releaseId, { uploadId, name: 'Keeper v2.wav', trackId }),
      cookie: engineer.cookie,
      declaredBytes: replacement.length,
      first: replacement.subarray(0, 1_000_000),
    });
    await expect
      .poll(async () => (await db.select().from(uploads).where(eq(uploads.id, uploadId))).length)
      .toBe(1);
    const cancel = await engineer.fetch(`/api/uploads/${uploadId}`, { method: 'DELETE' });
    expect(cancel.status).toBe(204);
    partial.drop();
    await expectOriginalCurrent(uploadId, 'cancelled');

    const retry = await engineer.upload(releaseId, replacement, { name: 'Keeper v2.wav', trackId });
    expect(retry.status).toBe(201);
    expect(uploadResultSchema.parse(await retry.json()).fileVersion).toBe(2);
  });

  it('a file whose header promises more audio than it holds is kept and its analysis fails in plain words', async () => {
    const header = wavHeader({
      sampleRateHz: 48_000,
      bits: 24,
      channels: 2,
      dataBytes: 48_000 * 6 * 10,
    });
    const data = sineFrames({
      sampleRateHz: 48_000,
      bits: 24,
      channels: 2,
      hz: 997,
      peakDbfs: -20,
      from: 0,
      count: 48_000 * 3,
    });
    const response = await engineer.upload(releaseId, Buffer.concat([header, data]), {
      name: 'Short.wav',
    });
    expect(response.status).toBe(201);
    const result = uploadResultSchema.parse(await response.json());
    await waitForAnalyses(engineer, releaseId);
    const [file] = await db.select().from(audioFiles).where(eq(audioFiles.id, result.audioFileId));
    expect(file?.analysisState).toBe('failed');
    expect(file?.analysisError).toMatch(/truncated/);
  });
});
