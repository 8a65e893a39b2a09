import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { buildTrackCsv } from '@/lib/server/metadata/csv-format';
import { getRelease } from '@/lib/server/releases';
import { defineRoute, parseOrThrow } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** The release's track metadata as CSV (one row per track, in running order). */
export const GET = defineRoute('release:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const release = await getRelease(getDb(), actor, id);
  if (!release) throw new ApiError('not_found', 'No release with that id is visible to you.');
  const name = (release.catalogueNumber ?? release.id).replace(/[^A-Za-z0-9._-]+/g, '-');
  return new Response(buildTrackCsv(release.tracks), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="${name}-tracks.csv"`,
      'cache-control': 'no-store',
    },
  });
});
