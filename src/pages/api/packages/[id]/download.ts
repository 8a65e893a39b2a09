import { getDb } from '@/lib/db/client';
import { createDownloadLink } from '@/lib/server/deliveries';
import { releaseParams } from '@/lib/server/params';
import { defineRoute, parseOrThrow } from '@/lib/server/route';

/** A download link that expires in minutes; the download is logged. */
export const POST = defineRoute('package:download', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'package address');
  return Response.json(await createDownloadLink(getDb(), actor, id));
});
