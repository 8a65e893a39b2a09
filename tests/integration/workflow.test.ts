/**
 * The release journey over the API: checks, sign-offs, a waiver, approval, a package built
 * into the S3 fake and verified with independent tools, sharing, e-mail, logged downloads,
 * acknowledgement, reopening for a second version, and a return.
 */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { checkReportSchema } from '@/lib/api/checks-schemas';
import {
  deliveriesResponseSchema,
  downloadResponseSchema,
  type WorkflowStatus,
  workflowStatusSchema,
} from '@/lib/api/workflow-schemas';
import { createDatabase } from '@/lib/db/client';
import { audioFiles, packageDownloads, packages } from '@/lib/db/schema';
import { createS3Client, presignGetUrl } from '@/lib/storage/s3';
import { checkBagRules } from '../support/bagit';
import { type Client, demoEmails, signedIn } from '../support/http';
import { waitForMail } from '../support/mail';
import { cleanTone, createFixtureRelease } from '../support/release-fixtures';
import { ensureProgram } from '../support/system-packages';
import type { WavSpec } from '../support/wav-stream';

const db = createDatabase(inject('databaseUrl'));
const { endpoint, bucket } = inject('s3');
const s3 = {
  client: createS3Client({
    endpoint,
    bucket,
    region: 'us-east-1',
    accessKeyId: 'S3RVER',
    secretAccessKey: 'S3RVER',
  }),
  bucket,
};
const releaseId = 'rel-flow';
let dir: string;
let engineer: Client;
let coordinator: Client;
let distributor: Client;

/** An fs/4 sine at 45°: its true peak sits 3 dB over its samples (EBU Tech 3341 case 19). */
function hotMaster(): WavSpec {
  const frames = 6 * 44_100;
  return {
    sampleRateHz: 44_100,
    bitsPerSample: 16,
    channels: 2,
    frames,
    sample: (i, ch) =>
      Math.min(1, i / 2205, (frames - 1 - i) / 2205) *
      (ch === 0 ? 0.95 : 0.85) *
      Math.sin((Math.PI / 2) * i + Math.PI / 4),
  };
}

beforeAll(async () => {
  ensureProgram('/usr/bin/unzip', ['unzip']);
  dir = await mkdtemp(join(tmpdir(), 'quayside-flow-'));
  await createFixtureRelease(db, {
    id: releaseId,
    title: 'Harbour Flow',
    profiles: ['cd-master'],
    upcEan: '2001234500074',
    artwork: false,
    tracks: [
      {
        title: 'Slack Water',
        isrc: 'XQFXT2680001',
        gapBeforeFrames: 150,
        audio: cleanTone({ sampleRateHz: 44_100, bitsPerSample: 16, seconds: 6, peakDbfs: -3 }),
      },
      { title: 'Bright Buoy', isrc: 'XQFXT2680002', gapBeforeFrames: 150, audio: hotMaster() },
    ],
  });
  [engineer, coordinator, distributor] = await Promise.all([
    signedIn(demoEmails.engineer),
    signedIn(demoEmails.coordinator),
    signedIn(demoEmails.distributor),
  ]);
}, 60_000);

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function status(client: Client = coordinator): Promise<WorkflowStatus> {
  const response = await client.get(`/api/releases/${releaseId}/workflow`);
  expect(response.status).toBe(200);
  return workflowStatusSchema.parse(await response.json());
}

async function waitForPackage(version: number): Promise<WorkflowStatus> {
  for (let i = 0; i < 100; i++) {
    const s = await status();
    const p = s.packages.find((x) => x.version === version);
    if (p && p.state !== 'building') return s;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`package version ${version} did not finish`);
}

async function verifyPackage(objectKey: string, expectedSha256: string) {
  const answer = await s3.client.send(new GetObjectCommand({ Bucket: bucket, Key: objectKey }));
  const bytes = Buffer.from(
    await (answer.Body as { transformToByteArray(): Promise<Uint8Array> }).transformToByteArray(),
  );
  expect(createHash('sha256').update(bytes).digest('hex')).toBe(expectedSha256);
  const zip = join(dir, `${createHash('sha256').update(objectKey).digest('hex').slice(0, 8)}.zip`);
  await writeFile(zip, bytes);
  // Debian's unzip checks every entry.
  expect(execFileSync('unzip', ['-t', zip], { encoding: 'utf8' })).toMatch(/No errors detected/);
  const out = join(dir, `out-${Date.now()}`);
  execFileSync('unzip', ['-q', zip, '-d', out]);
  const [bagFolder] = execFileSync('ls', [out], { encoding: 'utf8' }).trim().split('\n');
  const bagDir = join(out, bagFolder ?? '');
  // GNU coreutils verifies the manifests independently of our code (RFC 8493 §2.1.3, §2.2.1).
  execFileSync('sha256sum', ['-c', '--strict', 'manifest-sha256.txt'], { cwd: bagDir });
  execFileSync('sha256sum', ['-c', '--strict', 'tagmanifest-sha256.txt'], { cwd: bagDir });
  await checkBagRules(bagDir);
  return bagDir;
}

describe('from checks to delivery', () => {
  it('approval is refused while anything is open, and says what', async () => {
    const run = await engineer.post(`/api/releases/${releaseId}/checks`, {});
    expect(run.status).toBe(201);
    const report = checkReportSchema.parse(await run.json());
    const problems = report.findings.filter((f) => f.severity !== 'pass');
    expect(problems.map((f) => [f.ruleId, f.severity, f.trackId])).toEqual([
      ['truePeak', 'warning', 'trk-rel-flow-2'],
    ]);

    const s = await status();
    const refused = await coordinator.post(`/api/releases/${releaseId}/approve`, {
      version: s.version,
    });
    expect(refused.status).toBe(409);
    const body = (await refused.json()) as { error: { message: string } };
    expect(body.error.message).toContain('warning(s) are neither resolved nor waived');
    expect(body.error.message).toContain('The engineer has not signed off the audio.');
  });

  it('waivers belong to the rule’s owner, need a reason, and failures cannot be waived', async () => {
    const s = await status();
    const warning = s.blockers.unwaivedWarnings[0];
    expect(warning?.ruleId).toBe('truePeak');
    const key = warning?.key ?? '';
    expect(
      (
        await coordinator.post(`/api/releases/${releaseId}/waivers`, {
          findingKey: key,
          reason: 'Fine by me',
        })
      ).status,
    ).toBe(403);
    expect(
      (await engineer.post(`/api/releases/${releaseId}/waivers`, { findingKey: key, reason: '' }))
        .status,
    ).toBe(400);
    const waived = await engineer.post(`/api/releases/${releaseId}/waivers`, {
      findingKey: key,
      reason: 'The over is intended; the plant limits on cutting.',
    });
    expect(waived.status).toBe(201);
    const after = workflowStatusSchema.parse(await waived.json());
    expect(after.blockers.unwaivedWarnings).toEqual([]);
    expect(after.waivers.map((w) => [w.findingKey, w.active, w.waivedBy])).toEqual([
      [key, true, 'Eli Stroud'],
    ]);
  });

  it('with both sign-offs the coordinator approves; the package is built, complete and verifiable', async () => {
    expect((await coordinator.post(`/api/releases/${releaseId}/sign-off/audio`, {})).status).toBe(
      403,
    );
    expect((await engineer.post(`/api/releases/${releaseId}/sign-off/audio`, {})).status).toBe(200);
    const signed = await coordinator.post(`/api/releases/${releaseId}/sign-off/metadata`, {});
    expect(signed.status).toBe(200);
    const ready = workflowStatusSchema.parse(await signed.json());
    expect(ready.approvable).toBe(true);
    expect(
      await waitForMail(demoEmails.coordinator, /^Ready for approval: Harbour Flow$/),
    ).toHaveLength(1);

    const stale = await coordinator.post(`/api/releases/${releaseId}/approve`, {
      version: ready.version + 1,
    });
    expect(stale.status).toBe(409);
    const approved = await coordinator.post(`/api/releases/${releaseId}/approve`, {
      version: ready.version,
    });
    expect(approved.status).toBe(200);
    const s = await waitForPackage(1);
    expect(s.state).toBe('packaged');
    const pkg = s.packages[0];
    expect(pkg?.state).toBe('ready');

    const [row] = await db
      .select()
      .from(packages)
      .where(eq(packages.id, pkg?.id ?? ''));
    const bagDir = await verifyPackage(row?.objectKey ?? '', row?.sha256 ?? '');
    // The manifest's SHA-256 of each master equals the uploaded file's, byte for byte.
    const manifest = await readFile(join(bagDir, 'manifest-sha256.txt'), 'utf8');
    for (const file of await db
      .select()
      .from(audioFiles)
      .where(eq(audioFiles.recordingId, 'rec-rel-flow-0'))) {
      expect(manifest).toContain(`${file.sha256}  data/audio/01 Fixture Artist - Slack Water.wav`);
    }
    expect(manifest).toMatch(/ {2}data\/audio\/02 Fixture Artist - Bright Buoy\.wav\n/);
    expect(manifest).toMatch(/ {2}data\/metadata\/release\.json\n/);
    expect(manifest).toMatch(/ {2}data\/metadata\/tracks\.csv\n/);
    expect(manifest).toMatch(/ {2}data\/reports\/check-report\.html\n/);
    const report = await readFile(join(bagDir, 'data/reports/check-report.html'), 'utf8');
    expect(report).toContain('The over is intended; the plant limits on cutting.');
    expect(
      execFileSync(
        'unzip',
        [
          '-v',
          join(
            dir,
            `${createHash('sha256')
              .update(row?.objectKey ?? '')
              .digest('hex')
              .slice(0, 8)}.zip`,
          ),
        ],
        { encoding: 'utf8' },
      ),
    ).toMatch(/Stored .*Slack Water\.wav/);

    // An approved release is locked.
    expect(
      (
        await engineer.post(`/api/releases/${releaseId}/waivers`, {
          findingKey: 'x',
          reason: 'late change',
        })
      ).status,
    ).toBe(409);
  });

  it('shared with the distributor: an e-mail without the raw link, a logged download that matches', async () => {
    const distributorId = (await status()).distributors[0]?.userId ?? '';
    expect(
      (await engineer.post(`/api/releases/${releaseId}/shares`, { userId: distributorId })).status,
    ).toBe(403);
    expect(
      (await coordinator.post(`/api/releases/${releaseId}/shares`, { userId: distributorId }))
        .status,
    ).toBe(200);

    const [mail] = await waitForMail(demoEmails.distributor, /^Package ready: Harbour Flow/);
    expect(mail?.text).toContain('/deliveries');
    expect(mail?.text).not.toContain('X-Amz-Signature');

    const deliveries = deliveriesResponseSchema.parse(
      await (await distributor.get('/api/deliveries')).json(),
    );
    const mine = deliveries.deliveries.find((d) => d.releaseId === releaseId);
    expect(mine?.packages.map((p) => p.version)).toEqual([1]);
    expect(deliveries.deliveries.map((d) => d.releaseId)).not.toContain('rel-night-ferries');

    const link = downloadResponseSchema.parse(
      await (await distributor.post(`/api/packages/${mine?.packages[0]?.id}/download`, {})).json(),
    );
    expect(link.expiresInSeconds).toBeLessThanOrEqual(600);
    const downloaded = await fetch(link.url);
    expect(downloaded.status).toBe(200);
    const sha = createHash('sha256')
      .update(Buffer.from(await downloaded.arrayBuffer()))
      .digest('hex');
    expect(sha).toBe(mine?.packages[0]?.sha256);
    const logged = await db
      .select()
      .from(packageDownloads)
      .where(eq(packageDownloads.packageId, mine?.packages[0]?.id ?? ''));
    expect(logged.length).toBe(1);
  });

  it('a presigned link stops working once it expires', async () => {
    const [row] = await db.select().from(packages).where(eq(packages.releaseId, releaseId));
    const url = await presignGetUrl(s3, row?.objectKey ?? '', { expiresInSeconds: 1 });
    expect((await fetch(url)).status).toBe(200);
    await new Promise((r) => setTimeout(r, 2100));
    expect((await fetch(url)).status).toBe(403);
  });

  it('a distributor cannot reach what was not shared with it', async () => {
    const other = await signedIn(demoEmails.admin);
    // Package another release the distributor has no share of.
    await createFixtureRelease(db, {
      id: 'rel-flow-unshared',
      title: 'Not For You',
      profiles: ['cd-master'],
      upcEan: '2001234500081',
      artwork: false,
      tracks: [
        {
          title: 'Private',
          isrc: 'XQFXT2680003',
          gapBeforeFrames: 150,
          audio: cleanTone({ sampleRateHz: 44_100, bitsPerSample: 16, seconds: 5, peakDbfs: -3 }),
        },
      ],
    });
    await other.post('/api/releases/rel-flow-unshared/checks', {});
    await other.post('/api/releases/rel-flow-unshared/sign-off/audio', {});
    await other.post('/api/releases/rel-flow-unshared/sign-off/metadata', {});
    const s = workflowStatusSchema.parse(
      await (await other.get('/api/releases/rel-flow-unshared/workflow')).json(),
    );
    expect(
      (await other.post('/api/releases/rel-flow-unshared/approve', { version: s.version })).status,
    ).toBe(200);
    let packageId = '';
    for (let i = 0; i < 100 && !packageId; i++) {
      const [row] = await db
        .select()
        .from(packages)
        .where(eq(packages.releaseId, 'rel-flow-unshared'));
      if (row?.state === 'ready') packageId = row.id;
      else await new Promise((r) => setTimeout(r, 200));
    }
    expect((await distributor.post(`/api/packages/${packageId}/download`, {})).status).toBe(404);
    expect((await distributor.get('/api/releases/rel-flow-unshared')).status).toBe(404);
    expect((await distributor.post('/api/releases/rel-flow-unshared/acknowledge', {})).status).toBe(
      404,
    );
  });

  it('acknowledge, reopen for a second version, and return with a reason', async () => {
    expect((await distributor.post(`/api/releases/${releaseId}/acknowledge`, {})).status).toBe(204);
    expect((await status()).state).toBe('delivered');

    expect(
      (
        await coordinator.post(`/api/releases/${releaseId}/reopen`, {
          version: (await status()).version,
          reason: '',
        })
      ).status,
    ).toBe(400);
    const reopened = await coordinator.post(`/api/releases/${releaseId}/reopen`, {
      version: (await status()).version,
      reason: 'Corrected the composer credit.',
    });
    expect(reopened.status).toBe(200);
    expect(workflowStatusSchema.parse(await reopened.json()).state).toBe('in_review');
    const again = await coordinator.post(`/api/releases/${releaseId}/approve`, {
      version: (await status()).version,
    });
    expect(again.status, await again.clone().text()).toBe(200);
    const s = await waitForPackage(2);
    expect(s.packages.map((p) => [p.version, p.state])).toEqual([
      [2, 'ready'],
      [1, 'ready'],
    ]);

    expect(
      (await distributor.post(`/api/releases/${releaseId}/return`, { reason: 'no' })).status,
    ).toBe(400);
    const returned = await distributor.post(`/api/releases/${releaseId}/return`, {
      reason: 'Track 2 title differs from the cover.',
    });
    expect(returned.status).toBe(204);
    expect((await status()).state).toBe('returned');
    const [mail] = await waitForMail(
      demoEmails.coordinator,
      /^Returned by distributor: Harbour Flow$/,
    );
    expect(mail?.text).toContain('Track 2 title differs from the cover.');

    const history = (await (
      await coordinator.get(`/api/releases/${releaseId}/history`)
    ).json()) as {
      events: { action: string }[];
    };
    const actions = history.events.map((e) => e.action);
    for (const action of [
      'waiver.added',
      'release.approved',
      'package.ready',
      'release.shared',
      'package.downloaded',
      'delivery.acknowledged',
      'release.reopened',
      'delivery.returned',
    ]) {
      expect(actions, action).toContain(action);
    }
  });
});
