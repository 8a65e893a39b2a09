import { getDb } from '@/lib/db/client';
import { listAuditEvents } from '@/lib/server/audit';
import { defineRoute } from '@/lib/server/route';

/** The organisation's audit trail, newest first. */
export const GET = defineRoute('audit:read', async ({ actor }) => {
  return Response.json({ events: await listAuditEvents(getDb(), actor.organizationId) });
});
