import { and, eq } from 'drizzle-orm';
import { getAuth } from '../auth/auth';
import { isRole } from '../auth/permissions';
import { getDb } from '../db/client';
import { member, organization } from '../db/schema';

/** Resolves the request's session to user, organisation and role (all null when signed out). */
export async function resolveSession(headers: Headers): Promise<App.Locals> {
  const found = await getAuth().api.getSession({ headers });
  if (!found) return { user: null, session: null, organization: null, role: null };
  const { user, session } = found;
  const locals: App.Locals = {
    user: { id: user.id, name: user.name, email: user.email },
    session: { id: session.id, activeOrganizationId: session.activeOrganizationId },
    organization: null,
    role: null,
  };
  const orgId = session.activeOrganizationId;
  if (!orgId) return locals;
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
  return locals;
}
