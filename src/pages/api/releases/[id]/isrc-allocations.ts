import { z } from 'zod';
import { isrcAllocationRequestSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { allocateIsrcsToTracks } from '@/lib/server/metadata/isrc-allocation';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** Allocates the label's next ISRCs to the named tracks, or to every track missing one. */
export const POST = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const body = parseOrThrow(
    isrcAllocationRequestSchema,
    await readJson(ctx.request),
    'allocation request',
  );
  const result = await allocateIsrcsToTracks(getDb(), actor, id, body.trackIds);
  return Response.json(result, { status: result.allocated.length > 0 ? 201 : 200 });
});
