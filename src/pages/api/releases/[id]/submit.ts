import { versionRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { submitForReview } from '@/lib/server/workflow';

/** Draft (or returned) → in review. */
export const POST = defineRoute('check:run', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const { version } = parseOrThrow(versionRequestSchema, await readJson(ctx.request), 'request');
  return Response.json(await submitForReview(getDb(), actor, id, version));
});
