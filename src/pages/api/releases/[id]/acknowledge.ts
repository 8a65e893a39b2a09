import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { answerDelivery } from '@/lib/server/workflow';

/** The distributor confirms the package was ingested. */
export const POST = defineRoute('package:acknowledge', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  await answerDelivery(getDb(), actor, id, { kind: 'acknowledge' });
  return new Response(null, { status: 204 });
});
