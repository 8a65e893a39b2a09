import { defineMiddleware } from 'astro:middleware';
import type { APIContext } from 'astro';
import { clientAddressHeader } from './lib/auth/auth';
import { ensureBackgroundWork } from './lib/server/background';
import { getEnv } from './lib/server/env';
import { ApiError } from './lib/server/errors';
import { crossOriginRefusal } from './lib/server/origin';
import { applySecurityHeaders } from './lib/server/security-headers';
import { resolveSession } from './lib/server/session';

/**
 * Astro computes CSP hashes only in a build (astro.config.mjs `experimental.csp`), not under
 * `astro dev`. MODE, not DEV: DEV follows NODE_ENV, which is "test" when the tests build.
 */
const headerOptions = { pagePolicy: import.meta.env.MODE !== 'development' };

let publicOrigin: string | undefined;
/** BETTER_AUTH_URL's origin, read once (the environment does not change while we run). */
const ourOrigin = () => (publicOrigin ??= new URL(getEnv().BETTER_AUTH_URL).origin);

/** Pages a signed-out visitor may open; everything else sends them to sign-in. */
const publicPages = [/^\/sign-in\/?$/, /^\/invite\/[^/]+\/?$/, /^\/dev\/mail\/?$/];

/** Astro's client address: X-Forwarded-For's first entry when present, else the socket's. */
function clientAddressOf(context: APIContext): string | null {
  try {
    return context.clientAddress;
  } catch {
    return null; // Astro throws when the adapter could not tell
  }
}

export const onRequest = defineMiddleware(async (context, next) => {
  ensureBackgroundWork();
  const { pathname } = context.url;
  const isApi = pathname.startsWith('/api/');

  if (isApi) {
    // Astro's own `security.checkOrigin` runs first but only refuses form-like bodies (and
    // bodiless writes); this also covers JSON and file uploads. Our public origin and the
    // request's own (its Host is checked against astro.config.mjs `allowedDomains`) count.
    const refusal = crossOriginRefusal({
      method: context.request.method,
      origin: context.request.headers.get('origin'),
      secFetchSite: context.request.headers.get('sec-fetch-site'),
      trustedOrigins: [ourOrigin(), context.url.origin],
    });
    if (refusal) return applySecurityHeaders(new ApiError('forbidden', refusal).toResponse(), true);
  }
  if (pathname.startsWith('/api/auth/')) {
    // Replaces whatever the client sent: better-auth limits sign-ins per this address.
    context.request.headers.delete(clientAddressHeader);
    const address = clientAddressOf(context);
    if (address) context.request.headers.set(clientAddressHeader, address);
  }

  Object.assign(context.locals, await resolveSession(context.request.headers));
  if (!isApi && !context.locals.user && !publicPages.some((p) => p.test(pathname))) {
    const nextPath =
      pathname === '/' ? '' : `?next=${encodeURIComponent(pathname + context.url.search)}`;
    return applySecurityHeaders(context.redirect(`/sign-in${nextPath}`, 302), false, headerOptions);
  }
  const response = await next();
  if (response.status === 429 && !response.headers.has('Retry-After')) {
    // better-auth's per-address limiter names it X-Retry-After; Retry-After is RFC 9110 §10.2.3.
    const seconds = response.headers.get('X-Retry-After');
    if (seconds) response.headers.set('Retry-After', seconds);
  }
  return applySecurityHeaders(response, isApi, headerOptions);
});
