import { reopenRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { reopenRelease } from '@/lib/server/workflow';

/** Reopens an approved release, with a reason; the next approval makes a new package. */
export const POST = defineRoute('release:reopen', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const input = parseOrThrow(reopenRequestSchema, await readJson(ctx.request), 'request');
  return Response.json(await reopenRelease(getDb(), actor, id, input.version, input.reason));
});
