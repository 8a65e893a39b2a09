import { Readable } from 'node:stream';
import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { getCurrentArtwork } from '@/lib/server/metadata/artwork';
import { isReleaseVisible } from '@/lib/server/releases';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { getObjectStream, getS3 } from '@/lib/storage/s3';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** The bytes of the release's current cover art. */
export const GET = defineRoute('release:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  if (!(await isReleaseVisible(getDb(), actor, id))) {
    throw new ApiError('not_found', 'No release with that id is visible to you.');
  }
  const row = await getCurrentArtwork(getDb(), id);
  if (!row) throw new ApiError('not_found', 'This release has no cover art yet.');
  const stream = await getObjectStream(getS3(), row.objectKey);
  return new Response(Readable.toWeb(stream) as ReadableStream, {
    headers: {
      'content-type': `image/${row.format}`,
      'content-length': String(row.sizeBytes),
      'cache-control': 'private, max-age=31536000, immutable',
    },
  });
});
