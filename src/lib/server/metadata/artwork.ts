import { createHash } from 'node:crypto';
import { desc, eq } from 'drizzle-orm';
import type { ArtworkInfo } from '../../api/metadata-schemas';
import type { Database } from '../../db/client';
import { artworks } from '../../db/schema';
import { getS3, putObject } from '../../storage/s3';
import { recordAudit } from '../audit';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import { ARTWORK_MAX_BYTES, inspectArtwork } from './artwork-inspect';
import { assertUnlocked, loadReleaseRow } from './common';

function toInfo(row: typeof artworks.$inferSelect): ArtworkInfo {
  return {
    id: row.id,
    originalName: row.originalName,
    format: row.format,
    widthPx: row.widthPx,
    heightPx: row.heightPx,
    sizeBytes: row.sizeBytes,
    sha256: row.sha256,
    createdAt: row.createdAt.toISOString(),
    url: `/api/releases/${encodeURIComponent(row.releaseId)}/artwork/image?v=${row.id}`,
  };
}

/** The current (newest) artwork row of a release, or null. */
export async function getCurrentArtwork(db: Database, releaseId: string) {
  const [row] = await db
    .select()
    .from(artworks)
    .where(eq(artworks.releaseId, releaseId))
    .orderBy(desc(artworks.createdAt))
    .limit(1);
  return row ?? null;
}

export async function getArtworkInfo(db: Database, releaseId: string): Promise<ArtworkInfo | null> {
  const row = await getCurrentArtwork(db, releaseId);
  return row ? toInfo(row) : null;
}

/** Reads the request body up to the artwork size limit (413 past it). */
export async function readArtworkBody(request: Request): Promise<Uint8Array> {
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > ARTWORK_MAX_BYTES) {
    throw new ApiError('payload_too_large', 'Cover art is at most 40 MB; this file is larger.');
  }
  const bytes = new Uint8Array(await request.arrayBuffer());
  if (bytes.length > ARTWORK_MAX_BYTES) {
    throw new ApiError('payload_too_large', 'Cover art is at most 40 MB; this file is larger.');
  }
  if (bytes.length === 0) throw new ApiError('invalid_request', 'The file is empty.');
  return bytes;
}

/** Checks and stores a release's new cover art; the previous image stays in the history. */
export async function uploadArtwork(
  db: Database,
  actor: Actor,
  releaseId: string,
  file: { bytes: Uint8Array; originalName: string },
): Promise<ArtworkInfo> {
  const release = await loadReleaseRow(db, actor, releaseId);
  assertUnlocked(release);
  const inspected = inspectArtwork(file.bytes);
  if (!inspected.ok) {
    throw new ApiError('invalid_request', inspected.message, [
      { path: 'file', message: inspected.message },
    ]);
  }
  const { facts } = inspected;
  const id = crypto.randomUUID();
  const sha256 = createHash('sha256').update(file.bytes).digest('hex');
  const objectKey = `artwork/${actor.organizationId}/${releaseId}/${id}.${facts.format === 'jpeg' ? 'jpg' : 'png'}`;
  await putObject(getS3(), objectKey, Buffer.from(file.bytes), `image/${facts.format}`);
  const [row] = await db.transaction(async (tx) => {
    const inserted = await tx
      .insert(artworks)
      .values({
        id,
        releaseId,
        objectKey,
        originalName: file.originalName,
        format: facts.format,
        widthPx: facts.widthPx,
        heightPx: facts.heightPx,
        sizeBytes: file.bytes.length,
        sha256,
        uploadedBy: actor.userId,
      })
      .returning();
    await recordAudit(tx, {
      organizationId: actor.organizationId,
      releaseId,
      actorId: actor.userId,
      action: 'release.artwork.upload',
      after: {
        artworkId: id,
        originalName: file.originalName,
        format: facts.format,
        widthPx: facts.widthPx,
        heightPx: facts.heightPx,
        sha256,
      },
    });
    return inserted;
  });
  return toInfo(row!);
}
