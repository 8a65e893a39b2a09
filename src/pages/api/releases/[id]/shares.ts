import { shareRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { shareRelease } from '@/lib/server/workflow';

/** Shares the approved release with a distributor of the label. */
export const POST = defineRoute('release:share', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const { userId } = parseOrThrow(shareRequestSchema, await readJson(ctx.request), 'share');
  return Response.json(await shareRelease(getDb(), actor, id, userId));
});
