import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { HeadObjectCommand } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { workflowStatusSchema } from '@/lib/api/workflow-schemas';
import { createDatabase } from '@/lib/db/client';
import { packages } from '@/lib/db/schema';
import { createS3Client } from '@/lib/storage/s3';
import { downloadPackageZip, unpackAndVerifyBag } from '../support/bagit';
import { demoEmails, signedIn } from '../support/http';
import { cleanTone, createFixtureRelease } from '../support/release-fixtures';
import {
  killAllServerProcesses,
  killServerProcess,
  startServerProcess,
} from '../support/server-process';
import { ensureProgram } from '../support/system-packages';

const db = createDatabase(inject('databaseUrl'));
const { endpoint, bucket } = inject('s3');
const s3 = createS3Client({
  endpoint,
  bucket,
  region: 'us-east-1',
  accessKeyId: 'S3RVER',
  secretAccessKey: 'S3RVER',
});
const releaseId = 'rel-crash';
let dir: string;

async function packageRow() {
  const [row] = await db.select().from(packages).where(eq(packages.releaseId, releaseId));
  return row;
}

beforeAll(async () => {
  ensureProgram('/usr/bin/unzip', ['unzip']);
  dir = await mkdtemp(join(tmpdir(), 'quayside-crash-'));
  // Large enough (about 70 MB of 96 kHz/24-bit audio) that building takes a while.
  const long = cleanTone({ sampleRateHz: 96_000, bitsPerSample: 24, seconds: 60, peakDbfs: -8 });
  await createFixtureRelease(db, {
    id: releaseId,
    title: 'Storm Surge',
    profiles: ['pre-limiter'],
    upcEan: '2001234500098',
    artwork: false,
    tracks: [
      { title: 'First Swell', isrc: 'XQFXT2670001', gapBeforeFrames: 150, audio: long },
      { title: 'Second Swell', isrc: 'XQFXT2670002', gapBeforeFrames: 150, audio: long },
    ],
  });
}, 120_000);

afterAll(async () => {
  await killAllServerProcesses();
  await rm(dir, { recursive: true, force: true });
});

describe('a server killed mid-package', () => {
  it('leaves no package object, and a retry on the next server makes a valid package', async () => {
    const first = await startServerProcess();
    const engineer = await signedIn(demoEmails.engineer, first.url);
    const coordinator = await signedIn(demoEmails.coordinator, first.url);
    expect((await engineer.post(`/api/releases/${releaseId}/checks`, {})).status).toBe(201);
    expect((await engineer.post(`/api/releases/${releaseId}/sign-off/audio`, {})).status).toBe(200);
    const signed = workflowStatusSchema.parse(
      await (await coordinator.post(`/api/releases/${releaseId}/sign-off/metadata`, {})).json(),
    );
    expect(signed.approvable, JSON.stringify(signed.blockers)).toBe(true);

    const approved = await coordinator.post(`/api/releases/${releaseId}/approve`, {
      version: signed.version,
    });
    expect(approved.status).toBe(200);
    await killServerProcess(first.child);

    const interrupted = await packageRow();
    expect(interrupted?.state).toBe('building');
    const head = await s3
      .send(new HeadObjectCommand({ Bucket: bucket, Key: interrupted?.objectKey ?? '' }))
      .catch((e: Error) => e);
    expect(head).toBeInstanceOf(Error);

    const second = await startServerProcess();
    const admin = await signedIn(demoEmails.admin, second.url);
    for (let i = 0; i < 50 && (await packageRow())?.state === 'building'; i++) {
      await new Promise((r) => setTimeout(r, 100));
    }
    const failed = await packageRow();
    expect(failed?.state).toBe('failed');
    expect(failed?.error).toMatch(/server stopped/);

    expect((await admin.post(`/api/packages/${failed?.id}/retry`, {})).status).toBe(202);
    for (let i = 0; i < 150 && (await packageRow())?.state === 'building'; i++) {
      await new Promise((r) => setTimeout(r, 200));
    }
    const ready = await packageRow();
    expect(ready?.state).toBe('ready');
    expect(ready?.version).toBe(1);

    const zip = await downloadPackageZip(
      { client: s3, bucket },
      ready?.objectKey ?? '',
      join(dir, 'retry.zip'),
    );
    const bagDir = await unpackAndVerifyBag(zip, join(dir, 'out'));
    expect(bagDir).toMatch(/-v1$/);
  });
});
