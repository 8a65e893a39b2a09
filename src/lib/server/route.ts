import type { APIContext, APIRoute } from 'astro';
import type { z } from 'zod';
import { can, type Permission, type Role, seesOnlySharedReleases } from '../auth/permissions';
import { ApiError } from './errors';
import { appDataVersion, createReadCache } from './read-cache';

export interface Actor {
  userId: string;
  userName: string;
  organizationId: string;
  role: Role;
}

export interface RouteContext {
  ctx: APIContext;
  actor: Actor;
}

export interface PublicRouteContext {
  ctx: APIContext;
}

const routeMarker = Symbol.for('quayside.route');

/**
 * Defines an API handler that requires a signed-in member of an organisation whose role has
 * `permission`. Signed out → 401; no organisation or role lacks the permission → 403.
 * Every handler under src/pages/api is built with this or `definePublicRoute` (a test
 * checks it), so a route that does not name its permission cannot exist.
 */
export function defineRoute(
  permission: Permission,
  handler: (rc: RouteContext) => Promise<Response> | Response,
): APIRoute {
  const route: APIRoute = (ctx) =>
    respond(async () => {
      const { user, organization, role } = ctx.locals;
      if (!user) throw new ApiError('unauthenticated', 'Sign in to continue.');
      if (!organization || !role) {
        throw new ApiError('forbidden', 'You are not a member of any label on Quayside.');
      }
      if (!can(role, permission)) {
        throw new ApiError('forbidden', `Your role (${role}) may not do this (${permission}).`);
      }
      return handler({
        ctx,
        actor: { userId: user.id, userName: user.name, organizationId: organization.id, role },
      });
    });
  return Object.assign(route, { [routeMarker]: permission });
}

/** An API handler anyone may call (sign-in, accepting an invitation). Say why at the call. */
export function definePublicRoute(
  handler: (rc: PublicRouteContext) => Promise<Response> | Response,
): APIRoute {
  const route: APIRoute = (ctx) => respond(async () => handler({ ctx }));
  return Object.assign(route, { [routeMarker]: 'public' });
}

/** The permission a route was defined with, or undefined for a bare handler. */
export function routePermission(route: unknown): string | undefined {
  if (typeof route !== 'function') return undefined;
  return (route as unknown as Record<symbol, string | undefined>)[routeMarker];
}

async function respond(run: () => Promise<Response> | Response): Promise<Response> {
  try {
    return await run();
  } catch (error) {
    if (error instanceof ApiError) return error.toResponse();
    console.error('[api] unexpected error', error);
    return new ApiError(
      'internal',
      'Something went wrong on our side; nothing was changed.',
    ).toResponse();
  }
}

/**
 * Serialised GET answers of the pages' read endpoints, by who asks and what (see
 * read-cache.ts: kept until the database changes or 5 s pass).
 */
const answers = createReadCache<{ body: string }>({
  maxEntries: 2000,
  ttlMs: 5_000,
  // At most some 64 MB of answers (UTF-16 code units, up to two bytes each).
  sizeOf: (answer) => answer.body.length,
  maxSize: 32 * 1024 * 1024,
  version: appDataVersion,
});

/**
 * Who else may be handed an answer computed for this actor:
 * - `user`: nobody else (the safe default);
 * - `role`: members of the same organisation with the same role (the answer depends on the
 *   role, e.g. the actions it offers, and not on who holds it);
 * - `visibility`: members of the same organisation who see the same releases. Every role
 *   that sees all of the label's releases shares one answer; a distributor, who sees only
 *   what was shared with them, gets their own. Only for answers that read nothing of the actor
 *   but which releases they can see (the route has already checked the permission).
 */
export type AnswerAudience = 'user' | 'role' | 'visibility';

function audienceKey(actor: Actor, audience: AnswerAudience): string {
  if (audience === 'user') return `user:${actor.userId}:${actor.role}`;
  if (audience === 'role') return `role:${actor.role}`;
  return seesOnlySharedReleases(actor.role) ? `shared-with:${actor.userId}` : 'label';
}

/**
 * Answers a GET with `compute()`'s JSON, from the read cache when nothing was committed since it
 * was computed for the same organisation, URL and audience (see `AnswerAudience`). `liveTag`
 * names state outside the database that the answer shows (it must change when that state
 * does). Only answers that depend on nothing else may use this; errors thrown by `compute` are
 * never cached.
 */
export async function cachedJson(
  { ctx, actor }: RouteContext,
  compute: () => Promise<unknown>,
  options: { audience?: AnswerAudience; liveTag?: string; headers?: Record<string, string> } = {},
): Promise<Response> {
  const key = [
    actor.organizationId,
    audienceKey(actor, options.audience ?? 'user'),
    ctx.url.pathname,
    ctx.url.search,
  ];
  const { body } = await answers.get(
    key.join('\u0000'),
    async () => ({ body: JSON.stringify(await compute()) }),
    options.liveTag,
  );
  return new Response(body, {
    headers: { 'content-type': 'application/json', ...options.headers },
  });
}

/** Parses `value` with `schema` or throws a 400 listing each problem. */
export function parseOrThrow<T extends z.ZodType>(
  schema: T,
  value: unknown,
  what: string,
): z.infer<T> {
  const parsed = schema.safeParse(value);
  if (!parsed.success) {
    throw new ApiError(
      'invalid_request',
      `The ${what} is not valid.`,
      parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })),
    );
  }
  return parsed.data;
}

/** Largest JSON body a route reads unless it says otherwise (every form and order fits). */
export const DEFAULT_JSON_MAX_BYTES = 1024 * 1024;

/**
 * Reads a JSON body, refusing non-JSON content types (415), bodies over `maxBytes` (413, from
 * Content-Length before reading, or as soon as a streamed body passes it) and malformed JSON
 * (400). Memory stays bounded by `maxBytes` whatever the client sends.
 */
export async function readJson(
  request: Request,
  options: { maxBytes?: number } = {},
): Promise<unknown> {
  const maxBytes = options.maxBytes ?? DEFAULT_JSON_MAX_BYTES;
  const type = request.headers.get('content-type') ?? '';
  if (!type.toLowerCase().startsWith('application/json')) {
    throw new ApiError('unsupported_media_type', 'Send the request body as application/json.');
  }
  const tooLarge = () =>
    new ApiError(
      'payload_too_large',
      `The request body is larger than ${Math.round(maxBytes / 1024)} KiB.`,
    );
  const declared = Number(request.headers.get('content-length') ?? '0');
  if (declared > maxBytes) throw tooLarge();
  const parts: Uint8Array[] = [];
  let length = 0;
  try {
    if (request.body) {
      const reader = request.body.getReader();
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        length += value.length;
        if (length > maxBytes) {
          await reader.cancel().catch(() => undefined);
          throw tooLarge();
        }
        parts.push(value);
      }
    }
  } catch (error) {
    if (error instanceof ApiError) throw error;
    throw new ApiError('invalid_request', 'The request body could not be read.');
  }
  try {
    // As Request.json(): UTF-8, a leading BOM dropped, invalid bytes become U+FFFD.
    return JSON.parse(new TextDecoder().decode(Buffer.concat(parts)));
  } catch {
    throw new ApiError('invalid_request', 'The request body is not valid JSON.');
  }
}
