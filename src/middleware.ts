import { defineMiddleware } from 'astro:middleware';
import { ensureBackgroundWork } from './lib/server/background';
import { resolveSession } from './lib/server/session';

/** Pages a signed-out visitor may open; everything else sends them to sign-in. */
const publicPages = [/^\/sign-in\/?$/, /^\/invite\/[^/]+\/?$/, /^\/dev\/mail\/?$/];

export const onRequest = defineMiddleware(async (context, next) => {
  ensureBackgroundWork();
  const { pathname } = context.url;
  Object.assign(context.locals, await resolveSession(context.request.headers));

  const isApi = pathname.startsWith('/api/');
  if (!isApi && !context.locals.user && !publicPages.some((p) => p.test(pathname))) {
    const nextPath =
      pathname === '/' ? '' : `?next=${encodeURIComponent(pathname + context.url.search)}`;
    return context.redirect(`/sign-in${nextPath}`, 302);
  }
  const response = await next();
  response.headers.set('X-Content-Type-Options', 'nosniff');
  response.headers.set('Referrer-Policy', 'same-origin');
  if (!isApi) response.headers.set('X-Frame-Options', 'DENY');
  return response;
});
