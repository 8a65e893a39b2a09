import { waiveRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { waiveFinding } from '@/lib/server/workflow';

/** Waives one warning with a reason. The route admits those who read findings; the rule's
 * owner is checked inside (audio rules: engineer; metadata rules: coordinator). */
export const POST = defineRoute('finding:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const input = parseOrThrow(waiveRequestSchema, await readJson(ctx.request), 'waiver');
  return Response.json(await waiveFinding(getDb(), actor, id, input), { status: 201 });
});
