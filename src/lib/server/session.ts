import { createHash } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { getAuth } from '../auth/auth';
import { isRole } from '../auth/permissions';
import { getDb } from '../db/client';
import { member, organization } from '../db/schema';
import { appDataVersion, createReadCache } from './read-cache';

interface ResolvedSession {
  locals: App.Locals;
  /** When the session itself expires (ms since the epoch); 0 when signed out. */
  expiresAt: number;
}

/**
 * Resolved sessions by Cookie header, kept until the database changes (a sign-out, a role
 * change, a removed member or a switched organisation are all commits) or 10 s pass. Saves
 * better-auth's session and user reads and our membership read on most requests.
 */
const sessions = createReadCache<ResolvedSession>({
  maxEntries: 5000,
  ttlMs: 10_000,
  version: appDataVersion,
});

/** Resolves the request's session to user, organisation and role (all null when signed out). */
export async function resolveSession(headers: Headers): Promise<App.Locals> {
  const cookie = headers.get('cookie');
  if (!cookie) return (await lookUp(headers)).locals;
  const key = createHash('sha256').update(cookie).digest('base64url');
  const resolved = await sessions.get(key, () => lookUp(headers));
  if (resolved.expiresAt !== 0 && resolved.expiresAt <= Date.now()) {
    return (await lookUp(headers)).locals;
  }
  return resolved.locals;
}

async function lookUp(headers: Headers): Promise<ResolvedSession> {
  const found = await getAuth().api.getSession({ headers });
  if (!found) {
    return { locals: { user: null, session: null, organization: null, role: null }, expiresAt: 0 };
  }
  const { user, session } = found;
  const locals: App.Locals = {
    user: { id: user.id, name: user.name, email: user.email },
    session: { id: session.id, activeOrganizationId: session.activeOrganizationId },
    organization: null,
    role: null,
  };
  const resolved = { locals, expiresAt: new Date(session.expiresAt).getTime() };
  const orgId = session.activeOrganizationId;
  if (!orgId) return resolved;
  const [row] = await getDb()
    .select({
      id: organization.id,
      name: organization.name,
      slug: organization.slug,
      role: member.role,
    })
    .from(member)
    .innerJoin(organization, eq(organization.id, member.organizationId))
    .where(and(eq(member.userId, user.id), eq(member.organizationId, orgId)))
    .limit(1);
  if (row && isRole(row.role)) {
    locals.organization = { id: row.id, name: row.name, slug: row.slug };
    locals.role = row.role;
  }
  return resolved;
}
