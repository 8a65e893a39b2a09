import { versionRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { approveRelease } from '@/lib/server/workflow';

/** Approves the release (409 listing what blocks it) and starts building its package. */
export const POST = defineRoute('release:approve', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const { version } = parseOrThrow(versionRequestSchema, await readJson(ctx.request), 'request');
  return Response.json(await approveRelease(getDb(), actor, id, version));
});
