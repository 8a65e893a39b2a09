import { z } from 'zod';
import { getDb } from '@/lib/db/client';
import { ApiError } from '@/lib/server/errors';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { resumeInterruptedWork } from '@/lib/server/uploads/analysis-queue';
import { getTrackDetail } from '@/lib/server/uploads/queries';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** A track's file versions and the current file's measurements, for the track page. */
export const GET = defineRoute('finding:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'track address');
  const db = getDb();
  await resumeInterruptedWork(db);
  const detail = await getTrackDetail(db, actor, id);
  if (!detail) throw new ApiError('not_found', 'No track with that id is visible to you.');
  return Response.json(detail, { headers: { 'cache-control': 'no-store' } });
});
