import { and, asc, eq } from 'drizzle-orm';
import type { MembersResponse } from '../api/schemas';
import { getAuth } from '../auth/auth';
import type { Role } from '../auth/permissions';
import { getDb } from '../db/client';
import { invitation, member, organization, session, user } from '../db/schema';
import { recordAudit } from './audit';
import { ApiError } from './errors';
import type { Actor } from './route';

/** Members and open invitations of the actor's organisation. */
export async function listMembers(actor: Actor): Promise<MembersResponse> {
  const db = getDb();
  const members = await db
    .select({
      id: member.id,
      userId: user.id,
      name: user.name,
      email: user.email,
      role: member.role,
      joinedAt: member.createdAt,
    })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(eq(member.organizationId, actor.organizationId))
    .orderBy(asc(user.name));
  const invitations = await db
    .select()
    .from(invitation)
    .where(
      and(eq(invitation.organizationId, actor.organizationId), eq(invitation.status, 'pending')),
    )
    .orderBy(asc(invitation.email));
  return {
    members: members.map((m) => ({ ...m, joinedAt: m.joinedAt.toISOString() })),
    invitations: invitations.map((i) => ({
      id: i.id,
      email: i.email,
      role: i.role,
      status: i.expiresAt.getTime() < Date.now() ? 'expired' : i.status,
      expiresAt: i.expiresAt.toISOString(),
    })),
  };
}

/** Invites `email` to the actor's organisation with `role`; the e-mail goes out at once. */
export async function inviteMember(
  actor: Actor,
  headers: Headers,
  input: { email: string; role: Role },
): Promise<{ id: string }> {
  const db = getDb();
  const [existing] = await db
    .select({ id: member.id })
    .from(member)
    .innerJoin(user, eq(user.id, member.userId))
    .where(and(eq(member.organizationId, actor.organizationId), eq(user.email, input.email)))
    .limit(1);
  if (existing) throw new ApiError('conflict', `${input.email} is already a member of this label.`);
  try {
    const created = await getAuth().api.createInvitation({
      headers,
      body: {
        email: input.email,
        role: input.role,
        organizationId: actor.organizationId,
        resend: true,
      },
    });
    await recordAudit(db, {
      organizationId: actor.organizationId,
      actorId: actor.userId,
      action: 'member.invited',
      after: { email: input.email, role: input.role },
    });
    return { id: created.id };
  } catch (error) {
    throw toApiError(error, 'The invitation could not be created.');
  }
}

function toApiError(error: unknown, fallback: string): ApiError {
  if (error instanceof ApiError) return error;
  const message = error instanceof Error ? error.message : fallback;
  const status = (error as { statusCode?: number }).statusCode;
  if (status === 400 || status === 422) return new ApiError('invalid_request', message || fallback);
  if (status === 403) return new ApiError('forbidden', message || fallback);
  console.error('[members]', error);
  return new ApiError('internal', fallback);
}

/** What the invitation page shows before the visitor accepts. */
export async function previewInvitation(id: string) {
  const [row] = await getDb()
    .select({ inv: invitation, orgName: organization.name })
    .from(invitation)
    .innerJoin(organization, eq(organization.id, invitation.organizationId))
    .where(eq(invitation.id, id))
    .limit(1);
  if (!row)
    throw new ApiError(
      'not_found',
      'This invitation does not exist. Ask your label admin for a new one.',
    );
  const expired = row.inv.expiresAt.getTime() < Date.now();
  return {
    id: row.inv.id,
    email: row.inv.email,
    role: row.inv.role,
    organizationName: row.orgName,
    status: expired && row.inv.status === 'pending' ? 'expired' : row.inv.status,
    expiresAt: row.inv.expiresAt.toISOString(),
  };
}

/**
 * Creates the invited person's account with the password they chose, makes them a member
 * with the invited role and signs them in. Returns better-auth's Set-Cookie headers.
 */
export async function acceptInvitation(
  id: string,
  input: { name: string; password: string },
): Promise<Headers> {
  const preview = await previewInvitation(id);
  if (preview.status !== 'pending') {
    throw new ApiError(
      'conflict',
      `This invitation is ${preview.status}. Ask your label admin for a new one.`,
    );
  }
  const db = getDb();
  const [taken] = await db
    .select({ id: user.id })
    .from(user)
    .where(eq(user.email, preview.email))
    .limit(1);
  if (taken) {
    throw new ApiError(
      'conflict',
      `An account for ${preview.email} already exists; sign in instead.`,
    );
  }
  const [inv] = await db.select().from(invitation).where(eq(invitation.id, id)).limit(1);
  if (!inv) throw new ApiError('not_found', 'This invitation does not exist.');

  const signedUp = await getAuth().api.signUpEmail({
    body: { email: preview.email, password: input.password, name: input.name },
    returnHeaders: true,
  });
  const newUserId = signedUp.response.user.id;
  await db.transaction(async (tx) => {
    await tx.insert(member).values({
      id: crypto.randomUUID(),
      organizationId: inv.organizationId,
      userId: newUserId,
      role: inv.role ?? 'engineer',
    });
    await tx.update(invitation).set({ status: 'accepted' }).where(eq(invitation.id, id));
    await tx
      .update(session)
      .set({ activeOrganizationId: inv.organizationId })
      .where(eq(session.userId, newUserId));
  });
  await recordAudit(db, {
    organizationId: inv.organizationId,
    actorId: newUserId,
    action: 'member.joined',
    after: { email: preview.email, role: inv.role },
  });
  return signedUp.headers;
}
