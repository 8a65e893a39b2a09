import { getDb } from '@/lib/db/client';
import { listReleases } from '@/lib/server/releases';
import { cachedJson, defineRoute } from '@/lib/server/route';

export const GET = defineRoute('release:list', async (rc) =>
  cachedJson(rc, async () => ({ releases: await listReleases(getDb(), rc.actor) }), {
    audience: 'visibility',
  }),
);
