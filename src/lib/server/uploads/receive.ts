/**
 * Receiving a master: the request body is streamed through a SHA-256 hash straight into
 * object storage (multipart, a few parts in memory at most), under a key made of ids only.
 * The database learns about the file only once every byte is stored and counted, in one
 * transaction, so a dropped connection, a cancel or a crash never replaces what was current.
 */
import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import { Upload } from '@aws-sdk/lib-storage';
import { and, eq, max } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { audioFiles, recordings, releases, tracks, uploads } from '../../db/schema';
import { deleteObject, getS3, isStorageError, storageReachable } from '../../storage/s3';
import { recordAudit } from '../audit';
import { getEnv } from '../env';
import { ApiError } from '../errors';
import type { Actor } from '../route';
import { enqueueAnalysis, markUploadActive } from './analysis-queue';
import {
  formatBytes,
  SNIFF_BYTES,
  sanitizeDisplayName,
  sniffMasterHeader,
  titleFromFileName,
} from './files';

/** Release states whose files may no longer change (reopen first). */
const LOCKED_STATES = new Set(['approved', 'packaged', 'delivered']);
// 8 MiB parts, two in flight: about 24 MiB of buffers per upload whatever the file size.
const PART_BYTES = 8 * 1024 * 1024;
const PARTS_IN_FLIGHT = 2;
// How often the received byte count is written to the uploads row.
const PROGRESS_WRITE_MS = 1000;

/** The configured largest upload in bytes (QUAYSIDE_MAX_UPLOAD_BYTES, default 5 GiB). */
export function maxUploadBytes(): number {
  return getEnv().QUAYSIDE_MAX_UPLOAD_BYTES;
}

const activeControllers = new Map<string, AbortController>();

/** Stops an upload this process is receiving; true when there was one. */
export function cancelActiveUpload(uploadId: string): boolean {
  const controller = activeControllers.get(uploadId);
  if (!controller) return false;
  controller.abort(new UploadStopped('cancelled', 'The upload was cancelled.'));
  return true;
}

class UploadStopped extends Error {
  readonly state: 'failed' | 'cancelled';
  constructor(state: 'failed' | 'cancelled', message: string) {
    super(message);
    this.state = state;
  }
}

export interface ReceiveRequest {
  db: Database;
  actor: Actor;
  releaseId: string;
  /** Chosen by the browser (a UUID) so it can cancel before the answer arrives. */
  uploadId: string;
  rawName: string;
  /** The track whose file this replaces; null adds a new track at the end. */
  trackId: string | null;
  contentLength: number | null;
  body: ReadableStream<Uint8Array> | null;
  /** Fires when the client goes away. */
  signal: AbortSignal;
}

export interface ReceivedUpload {
  uploadId: string;
  audioFileId: string;
  trackId: string;
  recordingId: string;
  fileVersion: number;
  sizeBytes: number;
  sha256: string;
  originalName: string;
}

async function loadWritableRelease(db: Database, actor: Actor, releaseId: string) {
  const [release] = await db
    .select({ id: releases.id, state: releases.state, artist: releases.artist })
    .from(releases)
    .where(and(eq(releases.id, releaseId), eq(releases.organizationId, actor.organizationId)))
    .limit(1);
  if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');
  if (LOCKED_STATES.has(release.state)) {
    throw new ApiError(
      'conflict',
      'This release is approved and locked; reopen it before changing its files.',
    );
  }
  return release;
}

async function readHead(
  reader: ReadableStreamDefaultReader<Uint8Array>,
): Promise<{ head: Uint8Array; done: boolean }> {
  const parts: Uint8Array[] = [];
  let length = 0;
  while (length < SNIFF_BYTES) {
    const { done, value } = await reader.read();
    if (done) return { head: Buffer.concat(parts), done: true };
    parts.push(value);
    length += value.length;
  }
  return { head: Buffer.concat(parts), done: false };
}

/**
 * Streams one master into storage and records it. Refusals (404, 409, 400, 413, 415) happen
 * before anything is written. Throws ApiError; the uploads row ends 'stored', 'failed' or
 * 'cancelled'.
 */
export async function receiveUpload(request: ReceiveRequest): Promise<ReceivedUpload> {
  const { db, actor, releaseId, uploadId } = request;
  const release = await loadWritableRelease(db, actor, releaseId);
  let replaced: { id: string; recordingId: string } | null = null;
  if (request.trackId) {
    const [track] = await db
      .select({ id: tracks.id, recordingId: tracks.recordingId })
      .from(tracks)
      .where(and(eq(tracks.id, request.trackId), eq(tracks.releaseId, releaseId)))
      .limit(1);
    if (!track) throw new ApiError('not_found', 'That track is not on this release.');
    replaced = track;
  }
  const displayName = sanitizeDisplayName(request.rawName);
  if (!displayName) {
    throw new ApiError(
      'invalid_request',
      'The file name is empty once unsafe characters are removed.',
    );
  }
  const limit = maxUploadBytes();
  if (request.contentLength === null) {
    throw new ApiError('invalid_request', 'Send the file with a Content-Length header.');
  }
  if (request.contentLength > limit) {
    throw new ApiError(
      'payload_too_large',
      `The file is ${formatBytes(request.contentLength)}; the largest upload allowed is ${formatBytes(limit)}. Nothing was stored.`,
    );
  }
  const [existing] = await db
    .select({ id: uploads.id })
    .from(uploads)
    .where(eq(uploads.id, uploadId))
    .limit(1);
  if (existing) throw new ApiError('conflict', 'An upload with that id already exists.');
  if (!request.body) throw new ApiError('invalid_request', 'The request has no file in its body.');

  const reader = request.body.getReader();
  const { head, done: endedInHead } = await readHead(reader);
  const sniff = sniffMasterHeader(head);
  if (!sniff.ok) {
    await reader.cancel().catch(() => undefined);
    throw new ApiError('unsupported_media_type', sniff.message);
  }

  const audioFileId = crypto.randomUUID();
  const objectKey = `audio/${actor.organizationId}/${audioFileId}.${sniff.extension}`;
  await db.insert(uploads).values({
    id: uploadId,
    organizationId: actor.organizationId,
    releaseId,
    trackId: replaced?.id ?? null,
    objectKey,
    originalName: displayName,
    sizeBytes: request.contentLength,
    createdBy: actor.userId,
  });

  const controller = new AbortController();
  activeControllers.set(uploadId, controller);
  markUploadActive(uploadId, true);
  const onClientGone = () =>
    controller.abort(
      new UploadStopped('failed', 'The connection dropped before the whole file arrived.'),
    );
  if (request.signal.aborted) onClientGone();
  request.signal.addEventListener('abort', onClientGone, { once: true });

  const hash = createHash('sha256');
  let received = 0;
  let lastProgressWrite = Date.now();
  const expected = request.contentLength;
  async function* counted(): AsyncGenerator<Uint8Array> {
    const take = (chunk: Uint8Array) => {
      received += chunk.length;
      if (received > limit || received > expected) {
        throw new UploadStopped('failed', 'The body is longer than its declared size.');
      }
      hash.update(chunk);
      const now = Date.now();
      if (now - lastProgressWrite >= PROGRESS_WRITE_MS) {
        lastProgressWrite = now;
        void db
          .update(uploads)
          .set({ bytesReceived: received, updatedAt: new Date() })
          .where(eq(uploads.id, uploadId))
          .catch(() => undefined);
      }
      return chunk;
    };
    yield take(head);
    if (endedInHead) return;
    while (true) {
      if (controller.signal.aborted) throw controller.signal.reason;
      const { done, value } = await reader.read();
      if (done) break;
      yield take(value);
    }
    if (received !== expected) {
      throw new UploadStopped(
        'failed',
        `The connection dropped after ${formatBytes(received)} of ${formatBytes(expected)}.`,
      );
    }
  }

  const s3 = getS3();
  const transfer = new Upload({
    client: s3.client,
    params: {
      Bucket: s3.bucket,
      Key: objectKey,
      Body: Readable.from(counted(), { objectMode: false }),
      ContentType: sniff.contentType,
    },
    partSize: PART_BYTES,
    queueSize: PARTS_IN_FLIGHT,
    leavePartsOnError: false,
  });
  const onAbort = () => void transfer.abort().catch(() => undefined);
  controller.signal.addEventListener('abort', onAbort, { once: true });

  try {
    await transfer.done();
    if (controller.signal.aborted) throw controller.signal.reason;
    if (received !== expected) {
      throw new UploadStopped('failed', 'The connection dropped before the whole file arrived.');
    }
    const sha256 = hash.digest('hex');
    const result = await db.transaction(async (tx) => {
      let recordingId: string;
      let trackId: string;
      if (replaced) {
        recordingId = replaced.recordingId;
        trackId = replaced.id;
      } else {
        recordingId = crypto.randomUUID();
        trackId = crypto.randomUUID();
        const [last] = await tx
          .select({ position: max(tracks.position) })
          .from(tracks)
          .where(eq(tracks.releaseId, releaseId));
        await tx.insert(recordings).values({
          id: recordingId,
          organizationId: actor.organizationId,
          title: titleFromFileName(displayName),
          artist: release.artist,
        });
        await tx.insert(tracks).values({
          id: trackId,
          releaseId,
          recordingId,
          position: (last?.position ?? 0) + 1,
        });
      }
      const [latest] = await tx
        .select({ version: max(audioFiles.fileVersion) })
        .from(audioFiles)
        .where(eq(audioFiles.recordingId, recordingId));
      const previousVersion = latest?.version ?? null;
      const fileVersion = (previousVersion ?? 0) + 1;
      await tx.insert(audioFiles).values({
        id: audioFileId,
        recordingId,
        fileVersion,
        objectKey,
        originalName: displayName,
        sizeBytes: received,
        sha256,
        uploadedBy: actor.userId,
        analysisState: 'pending',
      });
      await tx
        .update(uploads)
        .set({
          state: 'stored',
          audioFileId,
          bytesReceived: received,
          sizeBytes: received,
          updatedAt: new Date(),
        })
        .where(eq(uploads.id, uploadId));
      await tx.update(releases).set({ updatedAt: new Date() }).where(eq(releases.id, releaseId));
      await recordAudit(tx, {
        organizationId: actor.organizationId,
        releaseId,
        actorId: actor.userId,
        action: replaced ? 'audio.replaced' : 'audio.uploaded',
        before: replaced ? { trackId, fileVersion: previousVersion } : null,
        after: {
          trackId,
          audioFileId,
          fileVersion,
          originalName: displayName,
          sizeBytes: received,
          sha256,
          newTrack: !replaced,
        },
      });
      return { recordingId, trackId, fileVersion };
    });
    enqueueAnalysis(db, audioFileId);
    return {
      uploadId,
      audioFileId,
      trackId: result.trackId,
      recordingId: result.recordingId,
      fileVersion: result.fileVersion,
      sizeBytes: received,
      sha256,
      originalName: displayName,
    };
  } catch (error) {
    const unexpected = !(error instanceof UploadStopped) && !controller.signal.aborted;
    const storageFailed = unexpected && (isStorageError(error) || !(await storageReachable(s3)));
    const stopped =
      error instanceof UploadStopped
        ? error
        : controller.signal.reason instanceof UploadStopped
          ? controller.signal.reason
          : new UploadStopped(
              'failed',
              storageFailed
                ? 'The file store could not be reached, so the file was not stored. Try again.'
                : 'The file could not be stored; nothing was kept.',
            );
    if (unexpected) {
      console.error('[upload] failed', uploadId, error instanceof Error ? error.message : error);
    }
    await transfer.abort().catch(() => undefined);
    // A small body may have been stored in one PUT before the failure was noticed.
    await deleteObject(s3, objectKey).catch(() => undefined);
    await db
      .update(uploads)
      .set({
        state: stopped.state,
        error: stopped.message,
        bytesReceived: received,
        updatedAt: new Date(),
      })
      .where(eq(uploads.id, uploadId));
    await reader.cancel().catch(() => undefined);
    throw new ApiError(
      storageFailed
        ? 'unavailable'
        : stopped.state === 'cancelled'
          ? 'conflict'
          : 'invalid_request',
      `${stopped.message} The previous file, if any, is still current.`,
    );
  } finally {
    activeControllers.delete(uploadId);
    markUploadActive(uploadId, false);
    request.signal.removeEventListener('abort', onClientGone);
    controller.signal.removeEventListener('abort', onAbort);
  }
}
