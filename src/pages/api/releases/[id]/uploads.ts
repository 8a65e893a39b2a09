import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';
import { analysisStateTag, resumeInterruptedWork } from '@/lib/server/uploads/analysis-queue';
import { findOwnRelease, getUploadStatus } from '@/lib/server/uploads/queries';
import { maxUploadBytes, receiveUpload } from '@/lib/server/uploads/receive';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });
const uploadQuerySchema = z.object({
  /** Chosen by the browser so it can cancel the upload before the answer arrives. */
  uploadId: z.uuid('Give the upload a UUID'),
  name: z.string().min(1, 'Give the file name').max(1024),
  /** Replace this track's file; without it the file becomes a new track. */
  trackId: z.string().min(1).max(64).optional(),
});
const contentLengthSchema = z.coerce.number().int().nonnegative();

/** Each track's current file, analysis state and progress, and the recent uploads. */
export const GET = defineRoute('audio:upload', async (rc) => {
  const { id } = parseOrThrow(paramsSchema, rc.ctx.params, 'release address');
  const db = getDb();
  await resumeInterruptedWork(db);
  return cachedJson(
    rc,
    async () => {
      if (!(await findOwnRelease(db, rc.actor, id))) {
        throw new ApiError('not_found', 'No release with that id is visible to you.');
      }
      return getUploadStatus(db, id, maxUploadBytes());
    },
    // Analysis progress is kept in memory, not in the database.
    {
      audience: 'visibility',
      liveTag: analysisStateTag(),
      headers: { 'cache-control': 'no-store' },
    },
  );
});

/**
 * Receives one master as the raw request body (no multipart form), streamed to storage.
 * `?uploadId=<uuid>&name=<file name>[&trackId=<track>]`.
 */
export const POST = defineRoute('audio:upload', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const query = parseOrThrow(
    uploadQuerySchema,
    Object.fromEntries(ctx.url.searchParams),
    'upload address',
  );
  const lengthHeader = ctx.request.headers.get('content-length');
  const contentLength =
    lengthHeader === null
      ? null
      : parseOrThrow(contentLengthSchema, lengthHeader, 'Content-Length');
  const db = getDb();
  await resumeInterruptedWork(db);
  try {
    const result = await receiveUpload({
      db,
      actor,
      releaseId: id,
      uploadId: query.uploadId,
      rawName: query.name,
      trackId: query.trackId ?? null,
      contentLength,
      body: ctx.request.body,
      signal: ctx.request.signal,
    });
    return Response.json(result, { status: 201 });
  } catch (error) {
    if (!(error instanceof ApiError)) throw error;
    // A refusal can come before the whole body was read: close the connection so the
    // client does not send its next request down a socket that still holds file bytes.
    const response = error.toResponse();
    response.headers.set('connection', 'close');
    return response;
  }
});
