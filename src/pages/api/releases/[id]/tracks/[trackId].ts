import { z } from 'zod';
import { trackUpdateSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { updateTrackMetadata } from '@/lib/server/metadata/track-metadata';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({
  id: z.string().min(1).max(64),
  trackId: z.string().min(1).max(64),
});

/** Edits a track's metadata; the body names the recording version it read (stale → 409). */
export const PATCH = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id, trackId } = parseOrThrow(paramsSchema, ctx.params, 'track address');
  const update = parseOrThrow(trackUpdateSchema, await readJson(ctx.request), 'track form');
  return Response.json(await updateTrackMetadata(getDb(), actor, id, trackId, update));
});
