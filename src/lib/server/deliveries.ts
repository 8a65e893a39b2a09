import { randomUUID } from 'node:crypto';
import { and, count, desc, eq, gte, inArray } from 'drizzle-orm';
import type { Delivery } from '../api/workflow-schemas';
import type { Database } from '../db/client';
import { packageDownloads, packages, releaseShares, releases } from '../db/schema';
import { packageFileName } from '../packaging/naming';
import { getS3, presignGetUrl } from '../storage/s3';
import { recordAudit } from './audit';
import { ApiError } from './errors';
import type { Actor } from './route';

/** How long a download link works: long enough to start a download, short enough to not leak. */
export const downloadLinkSeconds = 5 * 60;

/** Releases shared with the actor (all shared releases for an admin) and their ready packages. */
export async function listDeliveries(db: Database, actor: Actor): Promise<Delivery[]> {
  const shares = await db
    .select({ share: releaseShares, release: releases })
    .from(releaseShares)
    .innerJoin(releases, eq(releases.id, releaseShares.releaseId))
    .where(
      and(
        eq(releases.organizationId, actor.organizationId),
        actor.role === 'admin' ? undefined : eq(releaseShares.userId, actor.userId),
      ),
    )
    .orderBy(desc(releaseShares.createdAt));
  const seen = new Set<string>();
  const deliveries: Delivery[] = [];
  for (const { share, release } of shares) {
    if (seen.has(release.id)) continue;
    seen.add(release.id);
    const rows = await db
      .select()
      .from(packages)
      .where(
        and(
          eq(packages.releaseId, release.id),
          eq(packages.state, 'ready'),
          gte(packages.version, actor.role === 'admin' ? 1 : share.fromPackageVersion),
        ),
      )
      .orderBy(desc(packages.version));
    const downloads = rows.length
      ? await db
          .select({ packageId: packageDownloads.packageId, n: count() })
          .from(packageDownloads)
          .where(
            inArray(
              packageDownloads.packageId,
              rows.map((r) => r.id),
            ),
          )
          .groupBy(packageDownloads.packageId)
      : [];
    deliveries.push({
      releaseId: release.id,
      title: release.title,
      artist: release.artist,
      labelName: release.labelName,
      catalogueNumber: release.catalogueNumber,
      upcEan: release.upcEan,
      state: release.state,
      sharedAt: share.createdAt.toISOString(),
      packages: rows.map((p) => ({
        id: p.id,
        version: p.version,
        state: p.state,
        sizeBytes: p.sizeBytes,
        sha256: p.sha256,
        progressFiles: p.progressFiles,
        totalFiles: p.totalFiles,
        error: p.error,
        createdAt: p.createdAt.toISOString(),
        readyAt: p.readyAt?.toISOString() ?? null,
        manifest: (p.manifest as { path: string; sha256: string }[] | null) ?? null,
        downloads: downloads.find((d) => d.packageId === p.id)?.n ?? 0,
      })),
    });
  }
  return deliveries;
}

/** A short-lived download link for a package the actor may see; the download is logged. */
export async function createDownloadLink(db: Database, actor: Actor, packageId: string) {
  const [row] = await db
    .select({ pkg: packages, release: releases })
    .from(packages)
    .innerJoin(releases, eq(releases.id, packages.releaseId))
    .where(and(eq(packages.id, packageId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  if (row?.pkg.state !== 'ready')
    throw new ApiError('not_found', 'No such package is available to you.');
  if (actor.role !== 'admin') {
    const [share] = await db
      .select()
      .from(releaseShares)
      .where(
        and(eq(releaseShares.releaseId, row.release.id), eq(releaseShares.userId, actor.userId)),
      )
      .limit(1);
    if (!share || row.pkg.version < share.fromPackageVersion) {
      throw new ApiError('not_found', 'No such package is available to you.');
    }
  }
  await db.insert(packageDownloads).values({ id: randomUUID(), packageId, userId: actor.userId });
  await recordAudit(db, {
    organizationId: actor.organizationId,
    releaseId: row.release.id,
    actorId: actor.userId,
    action: 'package.downloaded',
    after: { version: row.pkg.version },
  });
  const url = await presignGetUrl(getS3(), row.pkg.objectKey, {
    expiresInSeconds: downloadLinkSeconds,
    downloadName: packageFileName(row.release.catalogueNumber, row.release.id, row.pkg.version),
  });
  return { url, expiresInSeconds: downloadLinkSeconds };
}
