import { getDb } from '@/lib/db/client';
import { listDeliveries } from '@/lib/server/deliveries';
import { defineRoute } from '@/lib/server/route';

/** Releases shared with the signed-in distributor, with their ready packages. */
export const GET = defineRoute('package:download', async ({ actor }) => {
  return Response.json({ deliveries: await listDeliveries(getDb(), actor) });
});
