/**
 * Same-origin check for state-changing API requests (CSRF defence), following the OWASP
 * Cross-Site Request Forgery Prevention Cheat Sheet ("Verifying Origin With Standard
 * Headers", "Fetch Metadata headers").
 */

/** Methods that must not change anything (RFC 9110 §9.2.1), so they are never checked. */
const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS']);

export interface OriginCheckInput {
  method: string;
  /** The request's `Origin` header, or null when absent. */
  origin: string | null;
  /** The request's `Sec-Fetch-Site` header, or null when absent. */
  secFetchSite: string | null;
  /** Origins we answer for, e.g. BETTER_AUTH_URL's and the request URL's own. */
  trustedOrigins: readonly string[];
}

/**
 * Why a request must be refused as cross-site, or null when it may go on.
 *
 * A request with neither header (curl, server-to-server) is allowed: forging a request needs
 * a victim's browser, and browsers send `Origin` on every cross-origin POST, PUT, PATCH and
 * DELETE (Fetch Standard, "append a request `Origin` header") and `Sec-Fetch-Site` on every
 * request (W3C Fetch Metadata). Checking these headers instead of tokens is common practice.
 */
export function crossOriginRefusal(input: OriginCheckInput): string | null {
  if (safeMethods.has(input.method.toUpperCase())) return null;
  if (input.secFetchSite?.toLowerCase() === 'cross-site') {
    return 'This request came from another site; Quayside accepts changes only from its own pages.';
  }
  if (input.origin !== null && !input.trustedOrigins.includes(input.origin)) {
    return `This request came from ${input.origin.slice(0, 200)}; Quayside accepts changes only from its own pages.`;
  }
  return null;
}
