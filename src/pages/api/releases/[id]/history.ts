import { getDb } from '@/lib/db/client';
import { listAuditEvents } from '@/lib/server/audit';
import { ApiError } from '@/lib/server/errors';
import { releaseParams } from '@/lib/server/params';
import { isReleaseVisible } from '@/lib/server/releases';
import { cachedJson, defineRoute, parseOrThrow } from '@/lib/server/route';

/** The release's audit trail, newest first. */
export const GET = defineRoute('audit:read', async (rc) => {
  const { id } = parseOrThrow(releaseParams, rc.ctx.params, 'release address');
  const db = getDb();
  return cachedJson(
    rc,
    async () => {
      if (!(await isReleaseVisible(db, rc.actor, id)))
        throw new ApiError('not_found', 'No release with that id is visible to you.');
      return { events: await listAuditEvents(db, rc.actor.organizationId, { releaseId: id }) };
    },
    { audience: 'visibility' },
  );
});
