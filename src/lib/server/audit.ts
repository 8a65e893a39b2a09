import type { Database } from '../db/client';
import { auditEvents } from '../db/schema';

/** Appends one event to the audit log (who, what, before, after). */
export async function recordAudit(
  db: Pick<Database, 'insert'>,
  event: {
    organizationId: string;
    releaseId?: string | null;
    actorId: string | null;
    action: string;
    before?: unknown;
    after?: unknown;
  },
): Promise<void> {
  await db.insert(auditEvents).values({
    id: crypto.randomUUID(),
    organizationId: event.organizationId,
    releaseId: event.releaseId ?? null,
    actorId: event.actorId,
    action: event.action,
    before: event.before ?? null,
    after: event.after ?? null,
  });
}
