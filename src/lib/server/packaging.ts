/**
 * Builds the package of an approved release in the background: a BagIt zip streamed from
 * the stored masters straight into object storage. The zip is written under a staging key
 * and copied to its final key only once complete, so a crash never leaves a partial
 * package where a distributor could find it; interrupted builds are marked failed (and
 * their staging objects removed) when the server next starts.
 */
import { createHash, randomUUID } from 'node:crypto';
import { PassThrough } from 'node:stream';
import { CopyObjectCommand, DeleteObjectCommand } from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { and, asc, desc, eq, inArray, max } from 'drizzle-orm';
import type { Database, Tx } from '../db/client';
import {
  artworks,
  audioFiles,
  checkRuns,
  packages,
  recordings,
  releaseShares,
  releases,
  tracks,
  user,
  waivers,
} from '../db/schema';
import { enqueueMail, flushOutbox } from '../mail/outbox';
import { renderPackageReadyMail } from '../mail/templates';
import { type PayloadFile, writeBag } from '../packaging/bag';
import {
  type PackageRelease,
  renderCheckReportHtml,
  renderCheckReportJson,
  renderReleaseJson,
  renderTracksCsv,
} from '../packaging/documents';
import { bagName, masterFileName } from '../packaging/naming';
import type { Finding } from '../specs/types';
import { getObjectStream, getS3, isStorageError, storageReachable } from '../storage/s3';
import { activeWaivers } from '../workflow/approval';
import { recordAudit } from './audit';
import { getEnv } from './env';
import { resolveProfiles } from './profiles';

type PackageRow = typeof packages.$inferSelect;

/** Running builds in this process, so tests and shutdown can wait for them. */
const running = new Map<string, Promise<void>>();

export function waitForPackageBuilds(): Promise<void> {
  return Promise.allSettled([...running.values()]).then(() => undefined);
}

/** Creates the next package version of the release and starts building it. */
export async function startPackageBuild(
  db: Database,
  input: { releaseId: string; organizationId: string; createdBy: string },
): Promise<PackageRow> {
  const [latest] = await db
    .select({ version: max(packages.version) })
    .from(packages)
    .where(eq(packages.releaseId, input.releaseId));
  const version = (latest?.version ?? 0) + 1;
  const id = randomUUID();
  const [row] = await db
    .insert(packages)
    .values({
      id,
      releaseId: input.releaseId,
      version,
      objectKey: `packages/${input.releaseId}/v${version}/package.zip`,
      createdBy: input.createdBy,
    })
    .returning();
  if (!row) throw new Error('package row was not created');
  const job = buildPackage(db, row, input.organizationId).finally(() => running.delete(id));
  running.set(id, job);
  return row;
}

function stagingKey(row: PackageRow): string {
  return `packages/${row.releaseId}/staging/${row.id}.zip`;
}

async function loadPackageRelease(db: Database, row: PackageRow, organizationId: string) {
  const [release] = await db.select().from(releases).where(eq(releases.id, row.releaseId)).limit(1);
  if (!release) throw new Error('The release no longer exists.');
  const trackRows = await db
    .select({ track: tracks, recording: recordings })
    .from(tracks)
    .innerJoin(recordings, eq(recordings.id, tracks.recordingId))
    .where(eq(tracks.releaseId, row.releaseId))
    .orderBy(asc(tracks.position));
  const files = new Map<string, typeof audioFiles.$inferSelect>();
  for (const { recording } of trackRows) {
    const [file] = await db
      .select()
      .from(audioFiles)
      .where(eq(audioFiles.recordingId, recording.id))
      .orderBy(desc(audioFiles.fileVersion))
      .limit(1);
    if (file) files.set(recording.id, file);
  }
  const [approver] = row.createdBy
    ? await db.select({ name: user.name }).from(user).where(eq(user.id, row.createdBy)).limit(1)
    : [];
  const profileIds = (
    await db.query.releaseProfiles.findMany({
      where: (rp, { eq: e }) => e(rp.releaseId, row.releaseId),
    })
  ).map((p) => p.profileId);
  const profiles = await resolveProfiles(db, organizationId, profileIds);
  const discCount = new Set(trackRows.map((t) => t.track.disc)).size;

  const payloadAudio: PayloadFile[] = [];
  const packageTracks: PackageRelease['tracks'] = [];
  for (const { track, recording } of trackRows) {
    const file = files.get(recording.id);
    if (!file) throw new Error(`Track ${track.position} (${recording.title}) has no master file.`);
    const extension = file.originalName.split('.').pop() ?? 'wav';
    const fileName = masterFileName({
      position: track.position,
      disc: track.disc,
      side: track.side,
      discCount,
      artist: recording.artist,
      title: recording.title,
      versionTitle: recording.versionTitle,
      extension,
    });
    payloadAudio.push({
      path: `audio/${fileName}`,
      open: () => getObjectStream(getS3(), file.objectKey),
      compress: false,
      expectedSha256: file.sha256,
    });
    packageTracks.push({
      trackId: track.id,
      position: track.position,
      disc: track.disc,
      side: track.side,
      title: recording.title,
      versionTitle: recording.versionTitle,
      artist: recording.artist,
      isrc: recording.isrc,
      iswc: recording.iswc,
      explicit: recording.explicit,
      gapBeforeSeconds: track.gapBeforeFrames / 75,
      durationSeconds:
        file.durationSamples != null && file.sampleRateHz
          ? file.durationSamples / file.sampleRateHz
          : null,
      credits: recording.credits,
      fileName,
      sha256: file.sha256,
      sampleRateHz: file.sampleRateHz,
      bitsPerSample: file.bitsPerSample,
      channels: file.channels,
    });
  }
  const packageRelease: PackageRelease = {
    id: release.id,
    title: release.title,
    artist: release.artist,
    labelName: release.labelName,
    catalogueNumber: release.catalogueNumber,
    upcEan: release.upcEan,
    releaseDate: release.releaseDate,
    genre: release.genre,
    language: release.language,
    pLine: release.pLine,
    cLine: release.cLine,
    explicit: release.explicit,
    packageVersion: row.version,
    approvedAt: row.createdAt.toISOString(),
    approvedBy: approver?.name ?? 'unknown',
    profiles: profiles.map((p) => ({ id: p.id, name: p.name, version: p.version })),
    tracks: packageTracks,
  };

  const [run] = await db
    .select()
    .from(checkRuns)
    .where(eq(checkRuns.releaseId, row.releaseId))
    .orderBy(desc(checkRuns.createdAt))
    .limit(1);
  const findings = (run?.findings ?? []) as Finding[];
  const waiverRows = await db
    .select({ waiver: waivers, by: user.name })
    .from(waivers)
    .leftJoin(user, eq(user.id, waivers.waivedBy))
    .where(eq(waivers.releaseId, row.releaseId));
  const active = activeWaivers(
    findings,
    waiverRows
      .filter((w) => !w.waiver.revokedAt)
      .map((w) => ({
        findingKey: w.waiver.findingKey,
        waivedMeasured: w.waiver.waivedMeasured,
        reason: w.waiver.reason,
        waivedBy: w.by ?? 'unknown',
        waivedAt: w.waiver.createdAt.toISOString(),
      })),
  );
  const reportInput = {
    release: packageRelease,
    findings,
    waivers: [...active.values()],
    checkedAt: run?.createdAt.toISOString() ?? 'never',
  };

  const [art] = await db
    .select()
    .from(artworks)
    .where(eq(artworks.releaseId, row.releaseId))
    .orderBy(desc(artworks.createdAt))
    .limit(1);
  const payload: PayloadFile[] = [
    ...payloadAudio,
    {
      path: 'metadata/release.json',
      open: () => renderReleaseJson(packageRelease),
      compress: true,
    },
    { path: 'metadata/tracks.csv', open: () => renderTracksCsv(packageRelease), compress: true },
    {
      path: 'reports/check-report.html',
      open: () => renderCheckReportHtml(reportInput),
      compress: true,
    },
    {
      path: 'reports/check-report.json',
      open: () => renderCheckReportJson(reportInput),
      compress: true,
    },
  ];
  if (art) {
    payload.push({
      path: `artwork/cover.${art.format === 'jpeg' ? 'jpg' : art.format}`,
      open: () => getObjectStream(getS3(), art.objectKey),
      compress: false,
      expectedSha256: art.sha256,
    });
  }
  return { release, packageRelease, payload };
}

async function buildPackage(db: Database, row: PackageRow, organizationId: string): Promise<void> {
  const s3 = getS3();
  const staging = stagingKey(row);
  let upload: Upload | null = null;
  let uploadDone: Promise<unknown> = Promise.resolve();
  // The first object-store failure seen by a read or the upload: later errors (an aborted
  // zip stream) are its consequences, and the user should hear about the cause.
  let storageFault: unknown = null;
  const noteFault = (error: unknown) => {
    if (storageFault === null && isStorageError(error)) storageFault = error;
  };
  try {
    const loaded = await loadPackageRelease(db, row, organizationId);
    const { release, packageRelease } = loaded;
    const payload = loaded.payload.map(
      (file): PayloadFile => ({
        ...file,
        open: () => {
          const opened = file.open();
          if (!(opened instanceof Promise)) return opened;
          return opened.then(
            (stream) => stream.on('error', noteFault),
            (error: unknown) => {
              noteFault(error);
              throw error;
            },
          );
        },
      }),
    );
    await db
      .update(packages)
      .set({ totalFiles: payload.length + 4 })
      .where(eq(packages.id, row.id));

    const body = new PassThrough();
    const zipHash = createHash('sha256');
    let zipBytes = 0;
    body.on('data', (chunk: Buffer) => {
      zipHash.update(chunk);
      zipBytes += chunk.length;
    });
    upload = new Upload({
      client: s3.client,
      params: { Bucket: s3.bucket, Key: staging, Body: body, ContentType: 'application/zip' },
      partSize: 8 * 1024 * 1024,
      queueSize: 2,
    });
    const uploaded = upload.done();
    uploadDone = uploaded.catch(noteFault);
    let lastProgress = 0;
    const bag = await writeBag({
      bagName: bagName(release.catalogueNumber, release.id, row.version),
      payload,
      info: {
        fields: [
          ['Source-Organization', release.labelName],
          ['External-Description', `${release.title} by ${release.artist}`],
          ['External-Identifier', release.upcEan ?? release.id],
          ['Internal-Sender-Identifier', release.catalogueNumber ?? release.id],
          ['Bag-Group-Identifier', release.id],
          ['Package-Version', String(row.version)],
          ['Release-Date', release.releaseDate ?? ''],
        ],
      },
      output: body,
      onProgress: (p) => {
        if (p.filesDone === lastProgress) return;
        lastProgress = p.filesDone;
        void db.update(packages).set({ progressFiles: p.filesDone }).where(eq(packages.id, row.id));
      },
    });
    await uploaded;

    await s3.client.send(
      new CopyObjectCommand({
        Bucket: s3.bucket,
        Key: row.objectKey,
        CopySource: `${s3.bucket}/${staging}`,
      }),
    );
    await s3.client.send(new DeleteObjectCommand({ Bucket: s3.bucket, Key: staging }));
    const manifest = packageRelease.tracks.map((t) => ({
      path: `data/audio/${t.fileName}`,
      sha256: t.sha256,
    }));
    for (const [path, sha256] of bag.payloadSha256) {
      if (!manifest.some((m) => m.path === path)) manifest.push({ path, sha256 });
    }
    // The ready row, the release's new state, the audit event and the distributors' mail
    // are recorded together: a crash leaves either all of them or a 'building' row.
    await db.transaction(async (tx) => {
      await tx
        .update(packages)
        .set({
          state: 'ready',
          sizeBytes: zipBytes,
          sha256: zipHash.digest('hex'),
          manifest,
          progressFiles: payload.length + 4,
          readyAt: new Date(),
        })
        .where(eq(packages.id, row.id));
      await tx
        .update(releases)
        .set({ state: 'packaged', updatedAt: new Date() })
        .where(and(eq(releases.id, row.releaseId), eq(releases.state, 'approved')));
      await recordAudit(tx, {
        organizationId,
        releaseId: row.releaseId,
        actorId: row.createdBy,
        action: 'package.ready',
        after: { version: row.version, sizeBytes: zipBytes, files: bag.payloadCount },
      });
      await queueDistributorMail(tx, organizationId, row.releaseId, row.version);
    });
    void flushOutbox(db).catch(() => undefined);
  } catch (error) {
    await upload?.abort().catch(() => undefined);
    // A failed part upload may be why the zip stream stopped: let it report first.
    await uploadDone;
    noteFault(error);
    const detail = error instanceof Error ? error.message : String(error);
    console.error(`[packaging] package ${row.id} failed:`, detail);
    // A read cut short ends as a bare "aborted" stream; asking the store tells why.
    const message =
      storageFault !== null || !(await storageReachable(s3))
        ? 'The file store could not be reached while the package was built; nothing was published. Build it again.'
        : detail;
    await s3.client
      .send(new DeleteObjectCommand({ Bucket: s3.bucket, Key: staging }))
      .catch(() => undefined);
    await db
      .update(packages)
      .set({ state: 'failed', error: message })
      .where(eq(packages.id, row.id));
    await recordAudit(db, {
      organizationId,
      releaseId: row.releaseId,
      actorId: row.createdBy,
      action: 'package.failed',
      after: { version: row.version, error: message },
    });
  }
}

/** Mails every distributor the release is shared with that a new package is ready. */
export async function notifyDistributors(
  db: Database,
  organizationId: string,
  releaseId: string,
  version: number,
  onlyUserIds?: string[],
): Promise<void> {
  await queueDistributorMail(db, organizationId, releaseId, version, onlyUserIds);
  void flushOutbox(db).catch(() => undefined);
}

/** Queues the package-ready mail to the release's distributors (in the caller's transaction). */
async function queueDistributorMail(
  db: Database | Tx,
  organizationId: string,
  releaseId: string,
  version: number,
  onlyUserIds?: string[],
): Promise<void> {
  const [release] = await db.select().from(releases).where(eq(releases.id, releaseId)).limit(1);
  if (!release) return;
  const shares = await db
    .select({ email: user.email, userId: user.id })
    .from(releaseShares)
    .innerJoin(user, eq(user.id, releaseShares.userId))
    .where(
      onlyUserIds?.length
        ? and(eq(releaseShares.releaseId, releaseId), inArray(releaseShares.userId, onlyUserIds))
        : eq(releaseShares.releaseId, releaseId),
    );
  const deliveriesUrl = new URL('/deliveries', getEnv().BETTER_AUTH_URL).toString();
  await enqueueMail(
    db,
    organizationId,
    shares.map((s) =>
      renderPackageReadyMail({
        to: s.email,
        releaseTitle: release.title,
        labelName: release.labelName,
        version,
        deliveriesUrl,
      }),
    ),
  );
}

/**
 * Marks builds left 'building' by a stopped server as failed and removes their staging
 * objects. Called once when the server starts.
 */
export async function recoverInterruptedPackages(db: Database): Promise<number> {
  const stuck = await db.select().from(packages).where(eq(packages.state, 'building'));
  const s3 = getS3();
  let recovered = 0;
  for (const row of stuck) {
    if (running.has(row.id)) continue;
    await s3.client
      .send(new DeleteObjectCommand({ Bucket: s3.bucket, Key: stagingKey(row) }))
      .catch(() => undefined);
    await db
      .update(packages)
      .set({
        state: 'failed',
        error: 'The server stopped while this package was being built. Build it again.',
      })
      .where(eq(packages.id, row.id));
    recovered++;
  }
  return recovered;
}

/** Builds a failed package version again under the same version number. */
export async function retryPackageBuild(
  db: Database,
  packageId: string,
  organizationId: string,
): Promise<PackageRow> {
  const [row] = await db
    .update(packages)
    .set({ state: 'building', error: null, progressFiles: 0 })
    .where(and(eq(packages.id, packageId), eq(packages.state, 'failed')))
    .returning();
  if (!row) throw new Error('Only a failed package can be built again.');
  const job = buildPackage(db, row, organizationId).finally(() => running.delete(row.id));
  running.set(row.id, job);
  return row;
}
