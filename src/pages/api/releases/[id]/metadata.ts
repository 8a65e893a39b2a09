import { z } from 'zod';
import { releaseUpdateSchema } from '@/lib/api/metadata-schemas';
import { getDb } from '@/lib/db/client';
import { updateReleaseMetadata } from '@/lib/server/metadata/release-metadata';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';

const paramsSchema = z.object({ id: z.string().min(1).max(64) });

/** Edits the release form; the body names the version it read (stale → 409). */
export const PATCH = defineRoute('metadata:edit', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(paramsSchema, ctx.params, 'release address');
  const update = parseOrThrow(releaseUpdateSchema, await readJson(ctx.request), 'release form');
  return Response.json(await updateReleaseMetadata(getDb(), actor, id, update));
});
