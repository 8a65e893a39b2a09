import { getCookies } from 'better-auth/cookies';
import { describe, expect, it } from 'vitest';
import { usesSecureCookies } from '@/lib/auth/auth';

/** The session cookie better-auth sets with our options for a public address. */
function sessionCookieFor(publicUrl: string) {
  return getCookies({
    baseURL: publicUrl,
    advanced: { useSecureCookies: usesSecureCookies(publicUrl) },
  }).sessionToken;
}

describe('session cookie attributes', () => {
  it('are Secure, with the __Secure- prefix, exactly when BETTER_AUTH_URL is https', () => {
    expect(usesSecureCookies('https://quayside.example')).toBe(true);
    expect(usesSecureCookies('http://localhost:4321')).toBe(false);

    const secure = sessionCookieFor('https://quayside.example');
    expect(secure.name).toBe('__Secure-better-auth.session_token');
    expect(secure.attributes.secure).toBe(true);
    const plain = sessionCookieFor('http://localhost:4321');
    expect(plain.name).toBe('better-auth.session_token');
    expect(plain.attributes.secure).toBe(false);
  });

  it('are HttpOnly, SameSite=Lax and Path=/ either way', () => {
    for (const url of ['https://quayside.example', 'http://localhost:4321']) {
      const { attributes } = sessionCookieFor(url);
      expect(attributes.httpOnly).toBe(true);
      expect(attributes.sameSite).toBe('lax');
      expect(attributes.path).toBe('/');
    }
  });
});
