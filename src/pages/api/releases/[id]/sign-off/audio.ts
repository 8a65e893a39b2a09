import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { signOff } from '@/lib/server/workflow';

/** The engineer signs off the audio as it is now (lapses if files, order or gaps change). */
export const POST = defineRoute('audio:signoff', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  return Response.json(await signOff(getDb(), actor, id, 'audio'));
});
