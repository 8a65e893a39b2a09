import { getDb } from '@/lib/db/client';
import { listReleases } from '@/lib/server/releases';
import { defineRoute } from '@/lib/server/route';

export const GET = defineRoute('release:list', async ({ actor }) => {
  return Response.json({ releases: await listReleases(getDb(), actor) });
});
