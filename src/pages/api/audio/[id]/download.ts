import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { findOwnAudioFile } from '@/lib/server/uploads/queries';
import { getS3, presignGetUrl } from '@/lib/storage/s3';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** Downloads any stored version (current or previous) through a five-minute storage URL. */
export const GET = defineRoute('audio:upload', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'audio address');
  const file = await findOwnAudioFile(getDb(), actor, id);
  if (!file) throw new ApiError('not_found', 'No audio file with that id is visible to you.');
  const url = await presignGetUrl(getS3(), file.objectKey, {
    expiresInSeconds: 300,
    downloadName: file.originalName,
  });
  return new Response(null, {
    status: 302,
    headers: { location: url, 'cache-control': 'no-store' },
  });
});
