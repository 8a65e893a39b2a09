import { Readable } from 'node:stream';
import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { findOwnAudioFile } from '@/lib/server/uploads/queries';
import { getObjectRange, getS3, presignGetUrl } from '@/lib/storage/s3';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

// Astro does not slow a response stream down for a slow client (STACK.md, "Audio playback"),
// so each answer is at most 2 MiB; the player asks for the next range as it plays.
const MAX_RANGE_BYTES = 2 * 1024 * 1024;

/** Parses one "bytes=a-b", "bytes=a-" or "bytes=-n" range; null when it is not one of those. */
function parseRange(header: string, sizeBytes: number): { start: number; end: number } | null {
  const match = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!match) return null;
  const [, first, last] = match;
  if (!first && !last) return null;
  let start: number;
  let end: number;
  if (!first) {
    start = Math.max(0, sizeBytes - Number(last));
    end = sizeBytes - 1;
  } else {
    start = Number(first);
    end = last ? Math.min(Number(last), sizeBytes - 1) : sizeBytes - 1;
  }
  if (start > end || start >= sizeBytes) return null;
  return { start, end: Math.min(end, start + MAX_RANGE_BYTES - 1) };
}

/**
 * Plays a stored file: answers Range requests with 206 and at most 2 MiB from object storage.
 * A request without Range (a download tool) is sent to a short-lived storage URL instead.
 */
export const GET = defineRoute('finding:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'audio address');
  const file = await findOwnAudioFile(getDb(), actor, id);
  if (!file) throw new ApiError('not_found', 'No audio file with that id is visible to you.');
  const s3 = getS3();
  const rangeHeader = ctx.request.headers.get('range');
  if (!rangeHeader) {
    const url = await presignGetUrl(s3, file.objectKey, { expiresInSeconds: 300 });
    return new Response(null, {
      status: 302,
      headers: { location: url, 'cache-control': 'no-store' },
    });
  }
  const range = parseRange(rangeHeader, file.sizeBytes);
  if (!range) {
    return new Response(null, {
      status: 416,
      headers: { 'content-range': `bytes */${file.sizeBytes}`, 'accept-ranges': 'bytes' },
    });
  }
  const part = await getObjectRange(s3, file.objectKey, `bytes=${range.start}-${range.end}`);
  const length = range.end - range.start + 1;
  return new Response(Readable.toWeb(part.body) as ReadableStream<Uint8Array>, {
    status: 206,
    headers: {
      'content-type': file.objectKey.endsWith('.aif') ? 'audio/aiff' : 'audio/wav',
      'content-length': String(length),
      'content-range': `bytes ${range.start}-${range.end}/${file.sizeBytes}`,
      'accept-ranges': 'bytes',
      'cache-control': 'private, max-age=3600',
    },
  });
});
