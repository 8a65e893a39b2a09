import { and, desc, eq } from 'drizzle-orm';
import type { Database } from '../db/client';
import { auditEvents, releases, user } from '../db/schema';

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

/** The newest audit events of the organisation, or of one release, with who did them. */
export async function listAuditEvents(
  db: Database,
  organizationId: string,
  options: { releaseId?: string; limit?: number } = {},
) {
  const rows = await db
    .select({ event: auditEvents, actor: user.name, releaseTitle: releases.title })
    .from(auditEvents)
    .leftJoin(user, eq(user.id, auditEvents.actorId))
    .leftJoin(releases, eq(releases.id, auditEvents.releaseId))
    .where(
      and(
        eq(auditEvents.organizationId, organizationId),
        options.releaseId ? eq(auditEvents.releaseId, options.releaseId) : undefined,
      ),
    )
    .orderBy(desc(auditEvents.createdAt))
    .limit(options.limit ?? 200);
  return rows.map((r) => ({
    id: r.event.id,
    action: r.event.action,
    actor: r.actor,
    releaseId: r.event.releaseId,
    releaseTitle: r.releaseTitle,
    before: r.event.before,
    after: r.event.after,
    createdAt: r.event.createdAt.toISOString(),
  }));
}
