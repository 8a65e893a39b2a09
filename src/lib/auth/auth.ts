import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { organization } from 'better-auth/plugins';
import { createAccessControl } from 'better-auth/plugins/access';
import { adminAc, defaultStatements, memberAc } from 'better-auth/plugins/organization/access';
import { asc, eq } from 'drizzle-orm';
import { type Database, getDb } from '../db/client';
import * as schema from '../db/schema';
import { enqueueMail, flushOutbox } from '../mail/outbox';
import { renderInvitationMail } from '../mail/templates';
import { getEnv } from '../server/env';
import { roleLabels } from './permissions';

/**
 * better-auth's own access control only guards its organisation endpoints (we expose none
 * of them directly); Quayside's permission table in ./permissions.ts guards everything else.
 */
const ac = createAccessControl(defaultStatements);
const orgRoles = {
  admin: ac.newRole(adminAc.statements),
  engineer: ac.newRole(memberAc.statements),
  coordinator: ac.newRole(memberAc.statements),
  distributor: ac.newRole(memberAc.statements),
};

/** Invitations stay open for a week (common practice for workspace invitations). */
export const invitationLifetimeSeconds = 7 * 24 * 3600;

export function createAuth(db: Database) {
  const env = getEnv();
  return betterAuth({
    appName: 'Quayside',
    baseURL: env.BETTER_AUTH_URL,
    secret: env.BETTER_AUTH_SECRET,
    trustedOrigins: [env.BETTER_AUTH_URL],
    database: drizzleAdapter(db, { provider: 'sqlite', schema }),
    emailAndPassword: { enabled: true, minPasswordLength: 10, autoSignIn: true },
    session: { expiresIn: 7 * 24 * 3600, updateAge: 24 * 3600 },
    telemetry: { enabled: false },
    plugins: [
      organization({
        ac,
        roles: orgRoles,
        creatorRole: 'admin',
        allowUserToCreateOrganization: false,
        invitationExpiresIn: invitationLifetimeSeconds,
        async sendInvitationEmail(data) {
          const role = data.role as keyof typeof roleLabels;
          // Queued with retries; flushed at once so the invitation normally arrives now.
          await enqueueMail(db, data.organization.id, [
            renderInvitationMail({
              to: data.email,
              organizationName: data.organization.name,
              inviterName: data.inviter.user.name,
              role: roleLabels[role] ?? data.role,
              acceptUrl: new URL(`/invite/${data.id}`, env.BETTER_AUTH_URL).toString(),
              expiresAt: data.invitation.expiresAt,
            }),
          ]);
          await flushOutbox(db);
        },
      }),
    ],
    databaseHooks: {
      session: {
        create: {
          // A new session starts in the user's first organisation, so every request has one.
          async before(newSession) {
            const [first] = await db
              .select({ organizationId: schema.member.organizationId })
              .from(schema.member)
              .where(eq(schema.member.userId, newSession.userId))
              .orderBy(asc(schema.member.createdAt))
              .limit(1);
            return {
              data: { ...newSession, activeOrganizationId: first?.organizationId ?? null },
            };
          },
        },
      },
    },
  });
}

export type Auth = ReturnType<typeof createAuth>;

let instance: Auth | undefined;

/** The process-wide better-auth instance. */
export function getAuth(): Auth {
  instance ??= createAuth(getDb());
  return instance;
}
