import { getDb } from '@/lib/db/client';
import { releaseParams } from '@/lib/server/params';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';
import { getWorkflowStatus } from '@/lib/server/workflow';

/** Sign-offs, blockers, waivers, packages and shares of the release. */
export const GET = defineRoute('finding:read', async (rc) => {
  const { id } = parseOrThrow(releaseParams, rc.ctx.params, 'release address');
  // Its actions and permissions follow the role.
  return cachedJson(rc, () => getWorkflowStatus(getDb(), rc.actor, id), { audience: 'role' });
});
