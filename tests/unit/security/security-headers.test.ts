import { describe, expect, it } from 'vitest';
import {
  apiContentSecurityPolicy,
  applySecurityHeaders,
  pageContentSecurityPolicy,
  parseDirectives,
} from '@/lib/server/security-headers';

const astroPolicy =
  "script-src 'self' 'sha256-AAA=' 'sha256-BBB='; style-src 'self' 'sha256-CCC=';";

describe('pageContentSecurityPolicy', () => {
  it("keeps Astro's script and style hashes and adds the other directives", () => {
    const policy = parseDirectives(pageContentSecurityPolicy(astroPolicy));
    expect(policy.get('script-src')).toBe("'self' 'sha256-AAA=' 'sha256-BBB='");
    expect(policy.get('style-src')).toBe("'self' 'sha256-CCC='");
    expect(Object.fromEntries(policy)).toMatchObject({
      'default-src': "'self'",
      'img-src': "'self'",
      'media-src': "'self'",
      'connect-src': "'self'",
      'object-src': "'none'",
      'base-uri': "'self'",
      'form-action': "'self'",
      'frame-ancestors': "'none'",
    });
  });

  it("falls back to 'self' only when Astro sent no policy, never to unsafe-inline", () => {
    const policy = pageContentSecurityPolicy(null);
    expect(parseDirectives(policy).get('script-src')).toBe("'self'");
    expect(policy).not.toMatch(/unsafe/);
  });
});

describe('applySecurityHeaders', () => {
  it('gives a page nosniff, Referrer-Policy, X-Frame-Options and the page policy', () => {
    const page = new Response('<p>hi</p>', { headers: { 'Content-Security-Policy': astroPolicy } });
    const headers = applySecurityHeaders(page, false).headers;
    expect(headers.get('x-content-type-options')).toBe('nosniff');
    expect(headers.get('referrer-policy')).toBe('same-origin');
    expect(headers.get('x-frame-options')).toBe('DENY');
    expect(headers.get('content-security-policy')).toBe(pageContentSecurityPolicy(astroPolicy));
  });

  it('leaves the page policy out when asked (astro dev computes no hashes)', () => {
    const headers = applySecurityHeaders(new Response('<p>hi</p>'), false, {
      pagePolicy: false,
    }).headers;
    expect(headers.get('content-security-policy')).toBeNull();
    expect(headers.get('x-frame-options')).toBe('DENY');
  });

  it('gives an API answer a policy that allows nothing', () => {
    const headers = applySecurityHeaders(Response.json({ ok: true }), true).headers;
    expect(headers.get('content-security-policy')).toBe(apiContentSecurityPolicy);
    expect(headers.get('x-content-type-options')).toBe('nosniff');
  });
});
