/**
 * Restarts, with real second server processes: a server killed while a file arrives leaves
 * no file and no current-version change, and the next server marks that upload failed; an
 * analysis left 'running' by a dead server is picked up and finished by the next one.
 */
import { request as httpRequest } from 'node:http';
import { HeadObjectCommand } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { uploadResultSchema } from '@/lib/api/schemas';
import { audioFiles, uploads } from '@/lib/db/schema';
import { demoEmails } from '../support/http';
import {
  killAllServerProcesses,
  killServerProcess,
  startServerProcess,
} from '../support/server-process';
import {
  createFixtureRelease,
  db,
  removeFixtureRelease,
  Session,
  sineFrames,
  sineWav,
  testS3,
  uploadPath,
  uploadStatus,
  waitForAnalyses,
  wavHeader,
} from './upload-support';

const releaseId = 'rel-upload-restart';

let trackId = '';
let originalFileId = '';

beforeAll(async () => {
  await createFixtureRelease(releaseId);
  const engineer = await Session.signIn(demoEmails.engineer);
  const response = await engineer.upload(releaseId, sineWav({ seconds: 2 }), {
    name: 'Anchor.wav',
  });
  const result = uploadResultSchema.parse(await response.json());
  trackId = result.trackId;
  originalFileId = result.audioFileId;
  await waitForAnalyses(engineer, releaseId);
});

afterAll(async () => {
  await killAllServerProcesses();
  await removeFixtureRelease(releaseId);
});

describe('a server restart', () => {
  it('killed mid-upload: nothing is stored, and the next server marks the upload failed', async () => {
    const first = await startServerProcess();
    const engineer = await Session.signIn(demoEmails.engineer, first.url);
    const uploadId = crypto.randomUUID();
    const frames = 48_000 * 120;
    const dataBytes = frames * 6;
    const base = new URL(first.url);
    const req = httpRequest({
      host: base.hostname,
      port: base.port,
      method: 'POST',
      path: uploadPath(releaseId, { uploadId, name: 'Anchor v2.wav', trackId }),
      headers: {
        origin: first.url,
        cookie: engineer.cookie,
        'content-type': 'audio/wav',
        'content-length': String(44 + dataBytes),
      },
    });
    req.on('error', () => undefined);
    req.write(wavHeader({ sampleRateHz: 48_000, bits: 24, channels: 2, dataBytes }));
    // About 20 MB: more than two 8 MiB parts, so a multipart upload is under way.
    req.write(
      sineFrames({
        sampleRateHz: 48_000,
        bits: 24,
        channels: 2,
        hz: 997,
        peakDbfs: -20,
        from: 0,
        count: frames / 4,
      }),
    );
    await expect
      .poll(async () => (await db.select().from(uploads).where(eq(uploads.id, uploadId))).length, {
        timeout: 20_000,
      })
      .toBe(1);
    // Let the first parts reach storage, so a multipart upload is under way when it dies.
    await new Promise((r) => setTimeout(r, 1500));
    await killServerProcess(first.child);
    req.destroy();
    const [stale] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
    expect(stale?.state).toBe('receiving');

    const second = await startServerProcess();
    const again = await Session.signIn(demoEmails.engineer, second.url);
    const status = await uploadStatus(again, releaseId);
    expect(status.tracks[0]?.current?.id).toBe(originalFileId);
    expect(status.tracks[0]?.versionCount).toBe(1);
    const [row] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
    expect(row?.state).toBe('failed');
    expect(row?.error).toMatch(/server stopped/);
    const s3 = testS3();
    await expect(
      s3.client.send(new HeadObjectCommand({ Bucket: s3.bucket, Key: row?.objectKey })),
    ).rejects.toThrow();
    await killServerProcess(second.child);
  });

  it("an analysis a dead server left 'running' is finished by the next server", async () => {
    await db
      .update(audioFiles)
      .set({ analysisState: 'running', measurements: null, analyzedAt: null })
      .where(eq(audioFiles.id, originalFileId));
    const server = await startServerProcess();
    const engineer = await Session.signIn(demoEmails.engineer, server.url);
    const status = await waitForAnalyses(engineer, releaseId, 30_000);
    expect(status.tracks[0]?.current?.analysisState).toBe('done');
    const [row] = await db.select().from(audioFiles).where(eq(audioFiles.id, originalFileId));
    expect(
      (row?.measurements as { format: { durationSeconds: number } } | null)?.format.durationSeconds,
    ).toBeCloseTo(2, 6);
    await killServerProcess(server.child);
  });
});
