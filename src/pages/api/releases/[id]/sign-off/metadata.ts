import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';
import { signOff } from '@/lib/server/workflow';

/** The coordinator signs off the metadata as it is now (lapses if it changes). */
export const POST = defineRoute('release:approve', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  return Response.json(await signOff(getDb(), actor, id, 'metadata'));
});
