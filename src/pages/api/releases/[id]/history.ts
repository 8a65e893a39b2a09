import { getDb } from '@/lib/db/client';
import { listAuditEvents } from '@/lib/server/audit';
import { ApiError } from '@/lib/server/errors';
import { releaseParams } from '@/lib/server/params';
import { getRelease } from '@/lib/server/releases';
import { defineRoute, parseOrThrow } from '@/lib/server/route';

/** The release's audit trail, newest first. */
export const GET = defineRoute('audit:read', async ({ ctx, actor }) => {
  const { id } = parseOrThrow(releaseParams, ctx.params, 'release address');
  const db = getDb();
  if (!(await getRelease(db, actor, id)))
    throw new ApiError('not_found', 'No release with that id is visible to you.');
  return Response.json({
    events: await listAuditEvents(db, actor.organizationId, { releaseId: id }),
  });
});
