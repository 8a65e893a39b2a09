import { reasonRequestSchema } from '@/lib/api/workflow-schemas';
import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow, readJson } from '@/lib/server/route';
import { answerDelivery } from '@/lib/server/workflow';

/** The distributor returns the release with a reason; the label is told and may fix it. */
export const POST = defineRoute('package:acknowledge', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const { reason } = parseOrThrow(reasonRequestSchema, await readJson(ctx.request), 'return');
  await answerDelivery(getDb(), actor, id, { kind: 'return', reason });
  return new Response(null, { status: 204 });
});
