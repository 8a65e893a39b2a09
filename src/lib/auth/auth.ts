import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { APIError, createAuthMiddleware, isAPIError } from 'better-auth/api';
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
import { createFixedWindowStore } from './rate-limit-store';
import { SignInFailureLimiter, signInLimit } from './sign-in-limit';

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

/**
 * The request header our middleware fills with the client's address (replacing any value the
 * client sent), for better-auth's per-address rate limit. Without it better-auth reads only
 * X-Forwarded-For, finds no address on a direct connection and puts everyone in one bucket.
 */
export const clientAddressHeader = 'x-quayside-client-address';

/**
 * Sign-in attempts one client address may make per minute, successful or not (better-auth's
 * limiter counts every request). Set far above what people, or the test suite signing in
 * from 127.0.0.1 (at most about 30 a minute), need; the per-account limit in
 * ./sign-in-limit.ts is what stops password guessing.
 */
export const signInAddressLimit = { window: 60, max: 150 } as const;

/**
 * Session cookies carry `Secure` (and better-auth's `__Secure-` name prefix) exactly when the
 * public address is https. Written out so it does not depend on NODE_ENV, better-auth's
 * fallback. HttpOnly, SameSite=Lax (RFC 6265bis §4.1.2.7) and Path=/ are its defaults.
 */
export function usesSecureCookies(publicUrl: string): boolean {
  return new URL(publicUrl).protocol === 'https:';
}

const signInFailures = new SignInFailureLimiter(signInLimit);
const rateLimitStore = createFixedWindowStore();

function signInEmailOf(body: unknown): string | null {
  const email = (body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' ? email : null;
}

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
    advanced: {
      useSecureCookies: usesSecureCookies(env.BETTER_AUTH_URL),
      ipAddress: { ipAddressHeaders: [clientAddressHeader] },
    },
    // On in every environment (better-auth's default is production only), kept in memory.
    rateLimit: {
      enabled: true,
      customStorage: rateLimitStore,
      customRules: { '/sign-in/email': signInAddressLimit },
    },
    hooks: {
      before: createAuthMiddleware(async (ctx) => {
        if (ctx.path !== '/sign-in/email') return;
        const email = signInEmailOf(ctx.body);
        if (!email) return;
        const retryAfterSeconds = signInFailures.begin(email);
        if (retryAfterSeconds > 0) {
          const minutes = Math.ceil(retryAfterSeconds / 60);
          throw new APIError(
            'TOO_MANY_REQUESTS',
            {
              code: 'TOO_MANY_FAILED_SIGN_INS',
              message: `Too many failed sign-ins for this account. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}.`,
            },
            { 'Retry-After': String(retryAfterSeconds) },
          );
        }
      }),
      after: createAuthMiddleware(async (ctx) => {
        if (ctx.path !== '/sign-in/email') return;
        const email = signInEmailOf(ctx.body);
        if (email && !isAPIError(ctx.context.returned)) signInFailures.succeeded(email);
      }),
    },
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
