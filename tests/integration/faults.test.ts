import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { HeadObjectCommand } from '@aws-sdk/client-s3';
import { and, asc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { uploadResultSchema } from '@/lib/api/schemas';
import { workflowStatusSchema } from '@/lib/api/workflow-schemas';
import { backupDatabase, checkDatabaseFile, restoreDatabase } from '@/lib/db/backup';
import { createDatabase } from '@/lib/db/client';
import {
  audioFiles,
  auditEvents,
  outbox,
  packages,
  releases,
  tracks,
  uploads,
} from '@/lib/db/schema';
import { downloadPackageZip, unpackAndVerifyBag } from '../support/bagit';
import { type FaultProxy, startFaultProxy } from '../support/fault-proxy';
import { demoEmails, signedIn } from '../support/http';
import { allMail, waitForMail } from '../support/mail';
import { cleanTone, createFixtureRelease } from '../support/release-fixtures';
import {
  killAllServerProcesses,
  killServerProcess,
  startServerProcess,
} from '../support/server-process';
import { ensureProgram } from '../support/system-packages';
import {
  createFixtureRelease as createUploadRelease,
  db as mainDb,
  removeFixtureRelease,
  Session,
  sineWav,
  testS3,
  waitForAnalyses,
} from './upload-support';

const uploadRelease = 'rel-faults-upload';
const packageRelease = 'rel-faults-package';
const orderRelease = 'rel-faults-order';
const invitee = 'faults-invitee@brackwater.test';

let dir = '';
let copyUrl = '';
let db: ReturnType<typeof createDatabase>;
let s3Proxy: FaultProxy;
let smtpProxy: FaultProxy;
let server: Awaited<ReturnType<typeof startServerProcess>>;
let anchor: { trackId: string; audioFileId: string };
const s3 = testS3();

function startSecondServer() {
  return startServerProcess({
    env: {
      DATABASE_URL: copyUrl,
      S3_ENDPOINT: s3Proxy.url,
      SMTP_URL: smtpProxy.url,
      QUAYSIDE_MAIL_RETRY_MS: '300',
    },
  });
}

async function until<T>(read: () => Promise<T>, done: (value: T) => boolean, ms = 30_000) {
  const deadline = Date.now() + ms;
  for (;;) {
    const value = await read();
    if (done(value) || Date.now() > deadline) return value;
    await new Promise((r) => setTimeout(r, 100));
  }
}

beforeAll(async () => {
  ensureProgram('/usr/bin/unzip', ['unzip']);
  dir = await mkdtemp(join(tmpdir(), 'quayside-faults-'));

  // Fixtures in the test server's database, copied below and then removed from it.
  await createUploadRelease(uploadRelease);
  const engineer = await Session.signIn(demoEmails.engineer);
  const first = await engineer.upload(uploadRelease, sineWav({ seconds: 2 }), {
    name: 'Anchor.wav',
  });
  anchor = uploadResultSchema.parse(await first.json());
  await waitForAnalyses(engineer, uploadRelease);
  // About 35 MB per master, so the package build moves well over the cut below.
  const long = cleanTone({ sampleRateHz: 96_000, bitsPerSample: 24, seconds: 60, peakDbfs: -8 });
  await createFixtureRelease(mainDb, {
    id: packageRelease,
    title: 'Low Water',
    profiles: ['pre-limiter'],
    upcEan: '2001234500104',
    artwork: false,
    tracks: [
      { title: 'Ebb', isrc: 'XQFLT2600001', gapBeforeFrames: 150, audio: long },
      { title: 'Slack', isrc: 'XQFLT2600002', gapBeforeFrames: 150, audio: long },
    ],
  });
  const blip = cleanTone({ sampleRateHz: 44_100, bitsPerSample: 16, seconds: 0.2, peakDbfs: -12 });
  await createFixtureRelease(mainDb, {
    id: orderRelease,
    title: 'Many Moorings',
    profiles: [],
    upcEan: '2001234500111',
    artwork: false,
    storeAudio: false,
    state: 'draft',
    tracks: Array.from({ length: 40 }, (_, i) => ({
      title: `Mooring ${i + 1}`,
      recording: 'one',
      isrc: 'XQFLT2600003',
      gapBeforeFrames: 150,
      audio: blip,
    })),
  });

  // The backup is taken while the test server is up; the restore makes the working copy.
  const backup = await backupDatabase(inject('databaseUrl'), join(dir, 'backup.db'));
  expect(backup.migrations).toBeGreaterThan(0);
  copyUrl = pathToFileURL(join(dir, 'faults.db')).href;
  await restoreDatabase(backup.path, copyUrl);
  db = createDatabase(copyUrl);
  for (const id of [uploadRelease, packageRelease, orderRelease]) await removeFixtureRelease(id);

  s3Proxy = await startFaultProxy(inject('s3').endpoint);
  smtpProxy = await startFaultProxy(inject('serverEnv').SMTP_URL ?? '', 'smtp');
  server = await startSecondServer();
}, 180_000);

afterAll(async () => {
  await killAllServerProcesses();
  await s3Proxy?.stop();
  await smtpProxy?.stop();
  if (dir) await rm(dir, { recursive: true, force: true });
});

describe('the object store stops', () => {
  it('during an upload: 503 with a clear message, no file recorded, the old master stays', async () => {
    const engineer = await Session.signIn(demoEmails.engineer, server.url);
    const cut = s3Proxy.cutAfter(4 * 1024 * 1024);
    const uploadId = crypto.randomUUID();
    // 60 s of 48 kHz 24-bit stereo: about 17 MB, so the store vanishes mid-transfer.
    const response = await engineer.upload(
      uploadRelease,
      sineWav({ seconds: 60, sampleRateHz: 48_000, bits: 24 }),
      { name: 'Anchor v2.wav', trackId: anchor.trackId, uploadId },
    );
    await cut;
    expect(response.status).toBe(503);
    const body = (await response.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('unavailable');
    expect(body.error.message).toMatch(/file store could not be reached/);
    expect(body.error.message).toMatch(/previous file, if any, is still current/);

    const [row] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
    expect(row?.state).toBe('failed');
    expect(row?.audioFileId).toBeNull();
    const files = await db
      .select({ id: audioFiles.id })
      .from(audioFiles)
      .innerJoin(tracks, eq(tracks.recordingId, audioFiles.recordingId))
      .where(eq(tracks.id, anchor.trackId));
    expect(files.map((f) => f.id)).toEqual([anchor.audioFileId]);

    await s3Proxy.start();
    const again = await engineer.upload(uploadRelease, sineWav({ seconds: 3 }), {
      name: 'Anchor v2.wav',
      trackId: anchor.trackId,
    });
    expect(again.status).toBe(201);
    expect(uploadResultSchema.parse(await again.json()).fileVersion).toBe(2);
  });

  it('during packaging: the build fails, nothing is published, a retry makes a valid bag', async () => {
    expect(server.child.exitCode, server.output()).toBeNull();
    const engineer = await signedIn(demoEmails.engineer, server.url);
    const coordinator = await signedIn(demoEmails.coordinator, server.url);
    const admin = await signedIn(demoEmails.admin, server.url);
    expect((await engineer.post(`/api/releases/${packageRelease}/checks`, {})).status).toBe(201);
    expect((await engineer.post(`/api/releases/${packageRelease}/sign-off/audio`, {})).status).toBe(
      200,
    );
    const signed = workflowStatusSchema.parse(
      await (
        await coordinator.post(`/api/releases/${packageRelease}/sign-off/metadata`, {})
      ).json(),
    );
    expect(signed.approvable, JSON.stringify(signed.blockers)).toBe(true);

    // Reading the two masters alone moves about 70 MB through the proxy.
    const cut = s3Proxy.cutAfter(20 * 1024 * 1024);
    const approved = await coordinator.post(`/api/releases/${packageRelease}/approve`, {
      version: signed.version,
    });
    expect(approved.status).toBe(200);
    await cut;
    const packageRow = async () =>
      (await db.select().from(packages).where(eq(packages.releaseId, packageRelease)))[0];
    const failed = await until(packageRow, (p) => p?.state !== 'building');
    expect(failed?.state).toBe('failed');
    expect(failed?.error, server.output()).toMatch(/file store could not be reached/);
    expect(failed?.error).not.toMatch(/127\.0\.0\.1|ECONN/);
    const head = await s3.client
      .send(new HeadObjectCommand({ Bucket: s3.bucket, Key: failed?.objectKey ?? '' }))
      .catch((e: Error) => e);
    expect(head).toBeInstanceOf(Error);
    const [release] = await db.select().from(releases).where(eq(releases.id, packageRelease));
    expect(release?.state).toBe('approved');
    const readyEvents = await db
      .select()
      .from(auditEvents)
      .where(
        and(eq(auditEvents.releaseId, packageRelease), eq(auditEvents.action, 'package.ready')),
      );
    expect(readyEvents).toHaveLength(0);

    await s3Proxy.start();
    expect((await admin.post(`/api/packages/${failed?.id}/retry`, {})).status).toBe(202);
    const ready = await until(packageRow, (p) => p?.state !== 'building', 60_000);
    expect(ready?.state, ready?.error ?? '').toBe('ready');
    const [packaged] = await db.select().from(releases).where(eq(releases.id, packageRelease));
    expect(packaged?.state).toBe('packaged');

    // Independent tools: Info-ZIP's test and GNU sha256sum over the BagIt manifests (RFC 8493).
    const zip = await downloadPackageZip(s3, ready?.objectKey ?? '', join(dir, 'package.zip'));
    await unpackAndVerifyBag(zip, join(dir, 'package'));
  });
});

describe('the mail server is down when a notification is due', () => {
  it('keeps the change, holds the message in the outbox across a restart, then sends it', async () => {
    await smtpProxy.stop();
    const admin = await signedIn(demoEmails.admin, server.url);
    const invited = await admin.post('/api/members/invitations', {
      email: invitee,
      role: 'coordinator',
    });
    expect(invited.status, await invited.clone().text()).toBeLessThan(300);

    const queued = async () =>
      (await db.select().from(outbox).where(eq(outbox.toAddress, invitee)))[0];
    const waiting = await until(queued, (m) => (m?.attempts ?? 0) >= 1);
    expect(waiting?.state).toBe('pending');
    expect(waiting?.lastError).toBeTruthy();
    expect((await allMail()).some((m) => m.to.includes(invitee))).toBe(false);

    // The server goes down with the message still queued; the next one sends it.
    await killServerProcess(server.child);
    await smtpProxy.start();
    server = await startSecondServer();
    const mail = await waitForMail(invitee, /invit/i);
    expect(mail).toHaveLength(1);
    const sent = await until(queued, (m) => m?.state === 'sent', 5_000);
    expect(sent?.state).toBe('sent');
    expect(sent?.attempts).toBeGreaterThanOrEqual(2);
  });
});

describe('the server killed while it rewrites a running order', () => {
  it('leaves the old or the new order every time, never a mix', async () => {
    const order = async () =>
      (
        await db
          .select({ id: tracks.id })
          .from(tracks)
          .where(eq(tracks.releaseId, orderRelease))
          .orderBy(asc(tracks.position))
      ).map((t) => t.id);
    const forward = await order();
    expect(forward).toHaveLength(40);
    const backward = [...forward].reverse();
    let writes = 0;
    const refusals: number[] = [];
    for (let round = 0; round < 3; round++) {
      const engineer = await signedIn(demoEmails.engineer, server.url);
      let stop = false;
      const writer = (async () => {
        while (!stop) {
          const current = await order();
          const [release] = await db.select().from(releases).where(eq(releases.id, orderRelease));
          const next = current[0] === forward[0] ? backward : forward;
          const answer = await engineer
            .request('PUT', `/api/releases/${orderRelease}/order`, {
              version: release?.version,
              tracks: next.map((id) => ({ id, gapBeforeFrames: 150 })),
            })
            .catch(() => null);
          if (answer?.status === 200) writes++;
          else if (answer) refusals.push(answer.status);
        }
      })();
      await new Promise((r) => setTimeout(r, 400 + round * 250));
      await killServerProcess(server.child);
      stop = true;
      await writer;
      const after = await order();
      expect([forward.join(), backward.join()]).toContain(after.join());
      server = await startSecondServer();
    }
    expect(writes).toBeGreaterThan(0);
    // A stale version (another write won) is the only refusal expected.
    expect(refusals.filter((status) => status !== 409)).toEqual([]);
    const file = join(dir, 'faults.db');
    const check = await checkDatabaseFile(file);
    expect(check.migrations).toBeGreaterThan(0);
    const mode = await db.run('PRAGMA journal_mode');
    expect(JSON.stringify(mode.rows)).toMatch(/wal/);
  });
});
