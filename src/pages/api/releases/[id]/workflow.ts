import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { getWorkflowStatus } from '@/lib/server/workflow';

/** Sign-offs, blockers, waivers, packages and shares of the release. */
export const GET = defineRoute('finding:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  return Response.json(await getWorkflowStatus(getDb(), actor, id));
});
