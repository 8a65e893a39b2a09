/**
 * Background analysis of stored masters. A file is analysed right after its bytes are in
 * object storage, read back from there, so the measurements always describe exactly what was
 * stored. Work is kept in the database (`audio_files.analysis_state`): a restart finds every
 * 'pending' or 'running' row and queues it again, and a time limit makes sure nothing stays
 * 'running' forever. Progress lives in memory; the browser polls it.
 */
import type { Readable } from 'node:stream';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import { and, eq, inArray, notInArray } from 'drizzle-orm';
import { analyzeStream, isAudioAnalysisError } from '../../audio';
import type { Database } from '../../db/client';
import { audioFiles, uploads } from '../../db/schema';
import { getS3 } from '../../storage/s3';
import { rerunChecksAfterUpload } from '../checks';
import { createProgressBoard } from './analysis-progress';

// Two analyses at once: the engine's pool has min(2, cores) threads and a stream uses one.
const MAX_CONCURRENT = 2;
// Allowed time: a minute plus one second per 4 MB. The engine reads well over 100 MB/s on
// this machine (src/lib/audio/README.md), so only a stuck read reaches this.
const BASE_TIMEOUT_MS = 60_000;
const MS_PER_BYTE = 1000 / 4e6;

const progressById = createProgressBoard();
const queued: string[] = [];
const queuedSet = new Set<string>();
let active = 0;
let database: Database | null = null;
let resuming: Promise<void> | null = null;

/** Upload ids being received by this process right now (see `markUploadActive`). */
const activeUploads = new Set<string>();

export function markUploadActive(uploadId: string, isActive: boolean): void {
  if (isActive) activeUploads.add(uploadId);
  else activeUploads.delete(uploadId);
}

/** A tag for the analysis state kept in memory: answers showing it are cached by it. */
export function analysisStateTag(): string {
  return progressById.tag();
}

/** Fraction 0…1 of an analysis under way in this process, or null. */
export function getAnalysisProgress(audioFileId: string): number | null {
  return progressById.fraction(audioFileId);
}

/** Queues the analysis of a stored file (idempotent while it waits). */
export function enqueueAnalysis(db: Database, audioFileId: string): void {
  database = db;
  if (queuedSet.has(audioFileId) || progressById.has(audioFileId)) return;
  queuedSet.add(audioFileId);
  queued.push(audioFileId);
  pump();
}

/**
 * Once per process: queues every analysis a previous process left 'pending' or 'running',
 * and marks uploads it was receiving as failed (their bytes were never referenced). Every
 * caller waits for that one pass to finish, so no upload starts or is reported before it. A
 * failed pass is logged, not repeated: uploads go on.
 */
export function resumeInterruptedWork(db: Database): Promise<void> {
  resuming ??= resume(db).catch((error: unknown) =>
    console.error('[uploads] recovery failed', error),
  );
  return resuming;
}

async function resume(db: Database): Promise<void> {
  database = db;
  const waiting = await db
    .select({ id: audioFiles.id })
    .from(audioFiles)
    .where(inArray(audioFiles.analysisState, ['pending', 'running']));
  for (const row of waiting) enqueueAnalysis(db, row.id);
  const stale = [...activeUploads];
  await db
    .update(uploads)
    .set({
      state: 'failed',
      error: 'The server stopped while this file was arriving; nothing was kept. Upload it again.',
      updatedAt: new Date(),
    })
    .where(
      stale.length
        ? and(eq(uploads.state, 'receiving'), notInArray(uploads.id, stale))
        : eq(uploads.state, 'receiving'),
    );
}

function pump(): void {
  while (active < MAX_CONCURRENT && queued.length > 0) {
    const id = queued.shift() as string;
    queuedSet.delete(id);
    active++;
    progressById.set(id, { bytesDone: 0, bytesTotal: 0 });
    void runAnalysis(id)
      .catch((error: unknown) => console.error('[analysis] unexpected failure', id, error))
      .finally(() => {
        active--;
        progressById.delete(id);
        pump();
      });
  }
}

/** Plain words for a failure, e.g. a truncated file; the engine's own messages are already plain. */
function describeFailure(error: unknown): string {
  if (isAudioAnalysisError(error)) {
    if (error.code === 'cancelled') return 'The analysis took too long and was stopped.';
    return error.message;
  }
  return 'The file could not be read back from storage for analysis.';
}

async function runAnalysis(audioFileId: string): Promise<void> {
  const db = database;
  if (!db) return;
  const [row] = await db
    .select({
      objectKey: audioFiles.objectKey,
      sizeBytes: audioFiles.sizeBytes,
      recordingId: audioFiles.recordingId,
    })
    .from(audioFiles)
    .where(eq(audioFiles.id, audioFileId))
    .limit(1);
  if (!row) return;
  await db
    .update(audioFiles)
    .set({ analysisState: 'running', analysisError: null })
    .where(eq(audioFiles.id, audioFileId));
  try {
    const signal = AbortSignal.timeout(Math.round(BASE_TIMEOUT_MS + row.sizeBytes * MS_PER_BYTE));
    const s3 = getS3();
    const answer = await s3.client.send(
      new GetObjectCommand({ Bucket: s3.bucket, Key: row.objectKey }),
      { abortSignal: signal },
    );
    const measurements = await analyzeStream(
      answer.Body as Readable,
      answer.ContentLength ?? row.sizeBytes,
      {
        signal,
        onProgress: (p) => progressById.set(audioFileId, p),
      },
    );
    await db
      .update(audioFiles)
      .set({
        measurements,
        analysisState: 'done',
        analysisError: null,
        analyzedAt: new Date(),
        sampleRateHz: measurements.format.sampleRateHz,
        bitsPerSample: measurements.format.bitsPerSample,
        channels: measurements.format.channels,
        durationSamples: measurements.format.durationSamples,
      })
      .where(eq(audioFiles.id, audioFileId));
    await rerunChecksAfterUpload(db, row.recordingId).catch((error: unknown) =>
      console.error('[analysis] checks after upload failed', audioFileId, error),
    );
  } catch (error) {
    await db
      .update(audioFiles)
      .set({
        analysisState: 'failed',
        analysisError: describeFailure(error),
        analyzedAt: new Date(),
      })
      .where(eq(audioFiles.id, audioFileId));
  }
}
