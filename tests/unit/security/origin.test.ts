import { describe, expect, it } from 'vitest';
import { crossOriginRefusal } from '@/lib/server/origin';

const trustedOrigins = ['https://quayside.example', 'http://localhost:4321'];

function check(method: string, origin: string | null, secFetchSite: string | null = null) {
  return crossOriginRefusal({ method, origin, secFetchSite, trustedOrigins });
}

describe('crossOriginRefusal', () => {
  it('never checks GET, HEAD or OPTIONS', () => {
    for (const method of ['GET', 'HEAD', 'OPTIONS', 'get']) {
      expect(check(method, 'https://attacker.example', 'cross-site')).toBeNull();
    }
  });

  it.each(['POST', 'PUT', 'PATCH', 'DELETE'])('refuses a %s from another origin', (method) => {
    expect(check(method, 'https://attacker.example')).toMatch(/attacker\.example/);
    expect(check(method, 'null')).not.toBeNull();
    // Same host, other scheme or port: another origin (RFC 6454).
    expect(check(method, 'http://quayside.example')).not.toBeNull();
    expect(check(method, 'https://quayside.example:8443')).not.toBeNull();
  });

  it('refuses Sec-Fetch-Site: cross-site whatever the Origin says', () => {
    expect(check('POST', 'https://quayside.example', 'cross-site')).not.toBeNull();
    expect(check('POST', null, 'Cross-Site')).not.toBeNull();
  });

  it('lets our own origins through, and requests with neither header', () => {
    expect(check('POST', 'https://quayside.example', 'same-origin')).toBeNull();
    expect(check('DELETE', 'http://localhost:4321')).toBeNull();
    expect(check('POST', null, 'same-origin')).toBeNull();
    expect(check('POST', null, 'none')).toBeNull();
    expect(check('POST', null, null)).toBeNull();
  });
});
