import type { APIRoute } from 'astro';
import { getAuth } from '@/lib/auth/auth';
import { definePublicRoute } from '@/lib/server/route';

/**
 * better-auth's endpoints that the browser may reach. Everything else it offers (sign-up,
 * organisation management…) is refused here: accounts are created only by accepting an
 * invitation, and membership changes go through our own permission-checked routes.
 */
const exposed = new Set(['/sign-in/email', '/sign-out', '/get-session']);

// Public by nature: signing in is how a visitor stops being anonymous.
export const ALL: APIRoute = definePublicRoute(({ ctx }) => {
  const path = ctx.url.pathname.replace(/^\/api\/auth/, '');
  if (!exposed.has(path)) {
    return Response.json(
      { error: { code: 'not_found', message: 'No such sign-in endpoint.' } },
      { status: 404 },
    );
  }
  return getAuth().handler(ctx.request);
});
