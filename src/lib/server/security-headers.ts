/**
 * Security headers for every response, set by src/middleware.ts. The directives follow
 * W3C Content Security Policy Level 3 and the OWASP Content Security Policy and HTTP Headers
 * cheat sheets.
 */

/**
 * The policy of an HTML page. Astro (`experimental.csp` in astro.config.mjs) hashes the
 * inline scripts and styles it writes into each page (island hydration, `astro-island`
 * styles) and sends them as `script-src` / `style-src`; we keep those two directives and
 * add the rest. No 'unsafe-inline' or 'unsafe-eval' anywhere: islands fetch only our own
 * /api, audio plays through /api/audio/…/stream (a Range request answered by us, never a
 * redirect to storage) and downloads are navigations, which CSP does not restrict.
 */
export function pageContentSecurityPolicy(astroPolicy: string | null): string {
  const fromAstro = parseDirectives(astroPolicy ?? '');
  return [
    "default-src 'self'",
    `script-src ${fromAstro.get('script-src') || "'self'"}`,
    `style-src ${fromAstro.get('style-src') || "'self'"}`,
    "img-src 'self'",
    "media-src 'self'",
    "connect-src 'self'",
    "font-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ');
}

/** JSON and file answers are never documents to render or frame (OWASP REST Security). */
export const apiContentSecurityPolicy = "default-src 'none'; frame-ancestors 'none'";

/** A policy's directives by name, each with its source list ("'self' 'sha256-…'"). */
export function parseDirectives(policy: string): Map<string, string> {
  const directives = new Map<string, string>();
  for (const part of policy.split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/);
    if (name && !directives.has(name.toLowerCase())) {
      directives.set(name.toLowerCase(), sources.join(' '));
    }
  }
  return directives;
}

/**
 * Sets our security headers on `response` (an API answer when `isApi`, else a page). Without
 * `pagePolicy` a page gets no CSP: `astro dev` hashes nothing, so it would block its scripts.
 */
export function applySecurityHeaders(
  response: Response,
  isApi: boolean,
  { pagePolicy = true }: { pagePolicy?: boolean } = {},
): Response {
  const headers = response.headers;
  headers.set('X-Content-Type-Options', 'nosniff');
  headers.set('Referrer-Policy', 'same-origin');
  if (isApi) {
    headers.set('Content-Security-Policy', apiContentSecurityPolicy);
  } else {
    headers.set('X-Frame-Options', 'DENY');
    if (pagePolicy) {
      headers.set(
        'Content-Security-Policy',
        pageContentSecurityPolicy(headers.get('Content-Security-Policy')),
      );
    }
  }
  return response;
}
