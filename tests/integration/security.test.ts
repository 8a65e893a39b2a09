/**
 * Security basics on the running server: session cookie attributes, the same-origin check on
 * state-changing API requests, the sign-in limits, security headers (with a browser pass over
 * the main pages looking for CSP violations), storage reached only through short-lived URLs,
 * and errors and logs that give nothing away.
 */
import { createHash, randomBytes } from 'node:crypto';
import { join } from 'node:path';
import { and, eq, sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { releaseDetailSchema } from '@/lib/api/schemas';
import { signInAddressLimit } from '@/lib/auth/auth';
import { signInLimit } from '@/lib/auth/sign-in-limit';
import { createDatabase } from '@/lib/db/client';
import { invitation, packages, recordings, tracks } from '@/lib/db/schema';
import { parseDirectives } from '@/lib/server/security-headers';
import {
  type BrowserSession,
  launchBrowser,
  newPage,
  screenshotDir,
  signInThroughForm,
} from '../support/browser';
import { Client, demoEmails, demoPassword, signedIn } from '../support/http';
import { cleanTone, createFixtureRelease } from '../support/release-fixtures';
import { killAllServerProcesses, startServerProcess } from '../support/server-process';

const db = createDatabase(inject('databaseUrl'));
const baseUrl = inject('baseUrl');
const brokenReleaseId = 'rel-sec-broken';
/** Longest a storage link may work (common practice: minutes, not hours). */
const maxLinkSeconds = 15 * 60;

/** A member of the demo label made for this file, so no demo account is ever locked. */
async function createThrowawayUser(admin: Client, name: string) {
  const email = `sec-${name}-${randomBytes(4).toString('hex')}@brackwater.test`;
  const password = `pw-${randomBytes(12).toString('hex')}`;
  const invited = await admin.post('/api/members/invitations', { email, role: 'engineer' });
  expect(invited.status).toBe(201);
  const [row] = await db
    .select({ id: invitation.id })
    .from(invitation)
    .where(and(eq(invitation.email, email), eq(invitation.status, 'pending')));
  const accepted = await new Client().post(`/api/invitations/${row?.id}/accept`, {
    name: `Security ${name}`,
    password,
  });
  expect(accepted.status).toBe(200);
  return { email, password };
}

function signInRequest(client: Client, email: string, password: string) {
  return client.post('/api/auth/sign-in/email', { email, password });
}

/** The session cookie's Set-Cookie line from a real sign-in. */
async function sessionSetCookie(email: string): Promise<string> {
  const response = await signInRequest(new Client(), email, demoPassword);
  expect(response.status).toBe(200);
  const line = response.headers.getSetCookie().find((c) => /session_token=/.test(c));
  expect(line).toBeDefined();
  return line ?? '';
}

function attributesOf(setCookie: string): Map<string, string> {
  const [, ...parts] = setCookie.split(';');
  return new Map(
    parts.map((p) => {
      const [key = '', ...value] = p.trim().split('=');
      return [key.toLowerCase(), value.join('=')];
    }),
  );
}

/**
 * Runs `fn` while the fixture release's stored data cannot be read (its recording's credits
 * are not JSON), so reading that release fails unexpectedly; repaired again afterwards, so
 * nothing else ever meets the broken row.
 */
async function whileBroken<T>(fn: () => Promise<T>): Promise<T> {
  const [track] = await db
    .select({ recordingId: tracks.recordingId })
    .from(tracks)
    .where(eq(tracks.releaseId, brokenReleaseId));
  const id = track?.recordingId ?? '';
  await db.run(sql`update ${recordings} set credits = '{not json' where id = ${id}`);
  try {
    return await fn();
  } finally {
    await db.run(sql`update ${recordings} set credits = '[]' where id = ${id}`);
  }
}

beforeAll(async () => {
  await createFixtureRelease(db, {
    id: brokenReleaseId,
    title: 'Broken Record',
    profiles: ['streaming-standard'],
    upcEan: '2001234500104',
    artwork: false,
    storeAudio: false,
    tracks: [
      {
        title: 'Scratch',
        isrc: 'XQSEC2600001',
        gapBeforeFrames: 0,
        audio: cleanTone({ sampleRateHz: 44_100, bitsPerSample: 16, seconds: 2, peakDbfs: -6 }),
      },
    ],
  });
}, 120_000);

afterAll(async () => {
  await killAllServerProcesses();
});

describe('session cookie', () => {
  it('is HttpOnly, SameSite=Lax, Path=/ and, on this http server, not Secure', async () => {
    const line = await sessionSetCookie(demoEmails.engineer);
    const attributes = attributesOf(line);
    expect(attributes.has('httponly')).toBe(true);
    expect(attributes.get('samesite')?.toLowerCase()).toBe('lax');
    expect(attributes.get('path')).toBe('/');
    // BETTER_AUTH_URL is http://localhost:…; with https it gets Secure and the __Secure-
    // prefix (tests/unit/session-cookies.test.ts checks better-auth's decision).
    expect(attributes.has('secure')).toBe(false);
    expect(line.startsWith('better-auth.session_token=')).toBe(true);
  });
});

describe('same-origin check on state-changing API requests', () => {
  it('refuses a cross-origin POST with 403 in our error shape, and nothing is changed', async () => {
    const admin = await signedIn(demoEmails.admin);
    const email = `sec-csrf-${randomBytes(4).toString('hex')}@brackwater.test`;
    const response = await admin.request(
      'POST',
      '/api/members/invitations',
      { email, role: 'admin' },
      { origin: 'https://attacker.example' },
    );
    expect(response.status).toBe(403);
    const body = (await response.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('forbidden');
    expect(body.error.message).toMatch(/only from its own pages/);
    const rows = await db.select().from(invitation).where(eq(invitation.email, email));
    expect(rows).toEqual([]);
  });

  it('refuses Sec-Fetch-Site: cross-site even when the Origin looks right', async () => {
    const admin = await signedIn(demoEmails.admin);
    const email = `sec-csrf-${randomBytes(4).toString('hex')}@brackwater.test`;
    const response = await admin.request(
      'POST',
      '/api/members/invitations',
      { email, role: 'engineer' },
      { 'sec-fetch-site': 'cross-site' },
    );
    expect(response.status).toBe(403);
    expect(await db.select().from(invitation).where(eq(invitation.email, email))).toEqual([]);
  });

  it('refuses a cross-origin DELETE and a cross-origin sign-in', async () => {
    const admin = await signedIn(demoEmails.admin);
    const evil = { origin: 'http://localhost.attacker.example' };
    const deleted = await admin.request('DELETE', '/api/profiles/cd-master', undefined, evil);
    expect(deleted.status).toBe(403);
    const signIn = await new Client().request(
      'POST',
      '/api/auth/sign-in/email',
      { email: demoEmails.engineer, password: demoPassword },
      evil,
    );
    expect(signIn.status).toBe(403);
    expect(signIn.headers.getSetCookie()).toEqual([]);
  });

  it('lets same-origin requests and requests without browser headers through', async () => {
    const admin = await signedIn(demoEmails.admin);
    const email = `sec-same-${randomBytes(4).toString('hex')}@brackwater.test`;
    const same = await admin.request(
      'POST',
      '/api/members/invitations',
      { email, role: 'engineer' },
      { 'sec-fetch-site': 'same-origin' },
    );
    expect(same.status).toBe(201);

    // curl or a server: no Origin, no Sec-Fetch-Site. CSRF needs a browser, which sends them.
    const cookie = (await sessionSetCookie(demoEmails.admin)).split(';')[0] ?? '';
    const email2 = `sec-plain-${randomBytes(4).toString('hex')}@brackwater.test`;
    const plain = await fetch(new URL('/api/members/invitations', baseUrl), {
      method: 'POST',
      headers: { cookie, 'content-type': 'application/json' },
      body: JSON.stringify({ email: email2, role: 'engineer' }),
    });
    expect(plain.status).toBe(201);
  });

  it("agrees with Astro's own checkOrigin, which refuses cross-site form posts first", async () => {
    const admin = await signedIn(demoEmails.admin);
    // Astro 5 (`security.checkOrigin`) answers a form-encoded cross-site POST itself, in
    // plain text; a JSON one reaches our check. Same-origin requests pass both.
    const form = await admin.request('POST', '/api/members/invitations', 'email=x', {
      origin: 'https://attacker.example',
      'content-type': 'application/x-www-form-urlencoded',
    });
    expect(form.status).toBe(403);
    const sameForm = await admin.request('POST', '/api/members/invitations', 'email=x', {
      'content-type': 'application/x-www-form-urlencoded',
    });
    expect(sameForm.status).toBe(415);
  });
});

describe('sign-in limits', () => {
  it(`after ${signInLimit.maxFailures} wrong passwords the account answers 429 with Retry-After, even for the right password`, async () => {
    const admin = await signedIn(demoEmails.admin);
    const victim = await createThrowawayUser(admin, 'victim');
    const bystander = await createThrowawayUser(admin, 'bystander');
    const attacker = new Client();
    for (let i = 0; i < signInLimit.maxFailures; i++) {
      const wrong = await signInRequest(attacker, victim.email, `wrong-password-${i}`);
      expect(wrong.status, `attempt ${i + 1}`).toBe(401);
    }
    const limited = await signInRequest(attacker, victim.email.toUpperCase(), 'wrong-again');
    expect(limited.status).toBe(429);
    const retryAfter = Number(limited.headers.get('retry-after'));
    expect(retryAfter).toBeGreaterThan(signInLimit.windowSeconds - 120);
    expect(retryAfter).toBeLessThanOrEqual(signInLimit.windowSeconds);
    const body = (await limited.json()) as { message: string };
    expect(body.message).toMatch(/Too many failed sign-ins for this account\. Try again in 15/);

    // The owner with the right password waits too (a success must not reopen guessing)…
    const owner = await signInRequest(new Client(), victim.email, victim.password);
    expect(owner.status).toBe(429);
    expect(owner.headers.getSetCookie()).toEqual([]);
    // …while every other account signs in as usual from the same address.
    const other = await signInRequest(new Client(), bystander.email, bystander.password);
    expect(other.status).toBe(200);
  });

  it("better-auth's per-address limit answers 429 with Retry-After past its budget", async () => {
    // On a server of its own, so this address's budget on the shared server stays untouched.
    // Empty bodies are refused at once (400) but count, so no password hashing is needed.
    const server = await startServerProcess();
    const client = new Client(server.url);
    for (let i = 0; i < signInAddressLimit.max; i++) {
      const refused = await client.post('/api/auth/sign-in/email', {});
      expect(refused.status, `request ${i + 1}`).toBe(400);
    }
    const limited = await signInRequest(client, demoEmails.engineer, demoPassword);
    expect(limited.status).toBe(429);
    const retryAfter = Number(limited.headers.get('retry-after'));
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(signInAddressLimit.window);
    expect(((await limited.json()) as { message: string }).message).toMatch(/Too many requests/);
  });

  it('a success does not count against the account', async () => {
    const admin = await signedIn(demoEmails.admin);
    const member = await createThrowawayUser(admin, 'regular');
    for (let i = 0; i < signInLimit.maxFailures + 2; i++) {
      expect((await signInRequest(new Client(), member.email, member.password)).status).toBe(200);
    }
  });
});

describe('security headers', () => {
  it('a page carries a CSP whose hashes cover every inline script and style, and no unsafe-inline', async () => {
    const admin = await signedIn(demoEmails.admin);
    const response = await admin.get('/releases/rel-night-ferries');
    expect(response.status).toBe(200);
    expect(response.headers.get('x-content-type-options')).toBe('nosniff');
    expect(response.headers.get('referrer-policy')).toBe('same-origin');
    expect(response.headers.get('x-frame-options')).toBe('DENY');
    const policy = parseDirectives(response.headers.get('content-security-policy') ?? '');
    expect(policy.get('default-src')).toBe("'self'");
    expect(policy.get('frame-ancestors')).toBe("'none'");
    expect(policy.get('object-src')).toBe("'none'");
    expect(policy.get('base-uri')).toBe("'self'");
    expect(policy.get('form-action')).toBe("'self'");
    expect(policy.get('connect-src')).toBe("'self'");
    for (const directive of ['script-src', 'style-src']) {
      expect(policy.get(directive)).not.toMatch(/unsafe-inline|unsafe-eval/);
    }

    const html = await response.text();
    const hashOf = (text: string) =>
      `'sha256-${createHash('sha256').update(text).digest('base64')}'`;
    const inlineScripts = [...html.matchAll(/<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g)];
    const inlineStyles = [...html.matchAll(/<style[^>]*>([\s\S]*?)<\/style>/g)];
    expect(inlineScripts.length).toBeGreaterThan(0);
    for (const [, text = ''] of inlineScripts) {
      expect(policy.get('script-src')?.split(' ')).toContain(hashOf(text));
    }
    for (const [, text = ''] of inlineStyles) {
      expect(policy.get('style-src')?.split(' ')).toContain(hashOf(text));
    }
  });

  it('an API answer carries nosniff and a CSP that allows nothing', async () => {
    const response = await (await signedIn(demoEmails.engineer)).get('/api/releases');
    expect(response.status).toBe(200);
    expect(response.headers.get('x-content-type-options')).toBe('nosniff');
    expect(response.headers.get('content-security-policy')).toBe(
      "default-src 'none'; frame-ancestors 'none'",
    );
    const signedOut = await new Client().get('/api/releases');
    expect(signedOut.headers.get('content-security-policy')).toContain("default-src 'none'");
  });

  describe('in a browser', () => {
    let session: BrowserSession;

    beforeAll(async () => {
      session = await launchBrowser();
    });

    afterAll(async () => {
      await session?.close();
    });

    it('a locked-out account is told why and for how long in the sign-in form', async () => {
      // No such account: unknown addresses are counted too, so no demo account is touched.
      const email = 'locked-form@brackwater.test';
      const attacker = new Client();
      for (let i = 0; i < signInLimit.maxFailures; i++) {
        expect((await signInRequest(attacker, email, `wrong-password-${i}`)).status).toBe(401);
      }
      const { context, page } = await newPage(session.browser);
      try {
        await page.goto('/sign-in');
        await page.getByRole('button', { name: 'Sign in' }).waitFor();
        await page.getByLabel('E-mail').fill(email);
        await page.getByLabel('Password').fill('wrong-once-more');
        await page.getByRole('button', { name: 'Sign in' }).click();
        const alert = page.getByText(/Too many failed sign-ins for this account/);
        await alert.waitFor({ timeout: 10_000 });
        expect(await alert.textContent()).toMatch(/Try again in 15 minutes/);
        await page.screenshot({ path: `${screenshotDir}/sign-in-locked.png` });
      } finally {
        await context.close();
      }
    });

    it('the main pages, signed in, raise no CSP violation and their islands work', async () => {
      const engineer = await signedIn(demoEmails.engineer);
      const release = releaseDetailSchema.parse(
        await (await engineer.get('/api/releases/rel-night-ferries')).json(),
      );
      const track = release.tracks.find((t) => t.audio);
      expect(track).toBeDefined();

      const { context, page } = await newPage(session.browser);
      const violations: string[] = [];
      const consoleLines: string[] = [];
      await context.exposeBinding('reportCspViolation', (_source, text: string) => {
        violations.push(text);
      });
      await context.addInitScript(() => {
        document.addEventListener('securitypolicyviolation', (event) => {
          const report = (window as unknown as { reportCspViolation: (t: string) => void })
            .reportCspViolation;
          report(
            `${event.violatedDirective} blocked ${event.blockedURI} on ${location.pathname} (${event.sourceFile}:${event.lineNumber})`,
          );
        });
      });
      page.on('console', (message) => consoleLines.push(`${message.type()}: ${message.text()}`));
      page.on('pageerror', (error) => consoleLines.push(`pageerror: ${error.message}`));

      // The sign-in form is an island: its button works only once React has hydrated.
      await signInThroughForm(page, demoEmails.admin, demoPassword);
      await page.getByRole('link', { name: 'Night Ferries' }).waitFor();

      await page.goto('/releases/rel-night-ferries');
      await page.getByTestId('track-table').waitFor();
      const edit = page.getByRole('button', { name: 'Edit release details' });
      await expect.poll(() => edit.isEnabled()).toBe(true);
      await edit.click();
      await page.getByRole('button', { name: 'Save release details' }).waitFor();
      await page.screenshot({
        path: join(screenshotDir, 'security-csp-release.png'),
        fullPage: true,
      });

      await page.goto(`/releases/rel-night-ferries/tracks/${track?.id}`);
      await expect
        .poll(() => page.getByTestId('track-title').textContent())
        .toContain(track?.title ?? '');
      await page.getByRole('button', { name: 'I have turned the level down' }).click();
      // The player reaches its audio through /api (media-src 'self').
      const readyState = await page.getByTestId('player').evaluate(async (element) => {
        const audio = element as HTMLAudioElement;
        audio.preload = 'metadata';
        audio.load();
        for (let i = 0; i < 100 && audio.readyState < 1; i++) {
          await new Promise((r) => setTimeout(r, 100));
        }
        return audio.readyState;
      });
      expect(readyState).toBeGreaterThanOrEqual(1);

      const others = ['/members', '/history', '/profiles', '/profiles/cd-master', '/deliveries'];
      for (const path of [...others, '/settings/isrc', '/dev/mail']) {
        await page.goto(path);
        await page.waitForLoadState('networkidle');
      }
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL('**/sign-in');

      expect(violations).toEqual([]);
      expect(consoleLines.filter((l) => /content security policy|refused to/i.test(l))).toEqual([]);
      await context.close();
    });
  });
});

describe('stored files are reached only through the API and short-lived URLs', () => {
  async function audioFileId(): Promise<string> {
    const engineer = await signedIn(demoEmails.engineer);
    const release = releaseDetailSchema.parse(
      await (await engineer.get('/api/releases/rel-night-ferries')).json(),
    );
    return release.tracks.find((t) => t.audio)?.audio?.audioFileId ?? '';
  }

  function expectShortLivedSignedUrl(location: string) {
    const url = new URL(location);
    expect(url.searchParams.get('X-Amz-Signature')).toMatch(/^[0-9a-f]{64}$/);
    const expires = Number(url.searchParams.get('X-Amz-Expires'));
    expect(expires).toBeGreaterThan(0);
    expect(expires).toBeLessThanOrEqual(maxLinkSeconds);
  }

  it('audio download and stream (without Range) redirect to a signed URL of a few minutes', async () => {
    const id = await audioFileId();
    const engineer = await signedIn(demoEmails.engineer);
    for (const path of [`/api/audio/${id}/download`, `/api/audio/${id}/stream`]) {
      const response = await engineer.get(path);
      expect(response.status, path).toBe(302);
      expect(response.headers.get('cache-control')).toBe('no-store');
      const location = response.headers.get('location') ?? '';
      expectShortLivedSignedUrl(location);
      expect((await fetch(location)).status).toBe(200);
    }
  });

  it('a package download link is signed and short-lived', async () => {
    const [pkg] = await db
      .select({ id: packages.id })
      .from(packages)
      .where(and(eq(packages.releaseId, 'rel-signal-hill'), eq(packages.state, 'ready')));
    const distributor = await signedIn(demoEmails.distributor);
    const response = await distributor.post(`/api/packages/${pkg?.id}/download`, {});
    expect(response.status).toBe(200);
    const link = (await response.json()) as { url: string; expiresInSeconds: number };
    expect(link.expiresInSeconds).toBeLessThanOrEqual(maxLinkSeconds);
    expectShortLivedSignedUrl(link.url);
  });

  it('signed out, every file route answers 401', async () => {
    const id = await audioFileId();
    const visitor = new Client();
    expect((await visitor.get(`/api/audio/${id}/download`)).status).toBe(401);
    expect((await visitor.get(`/api/audio/${id}/stream`)).status).toBe(401);
    expect((await visitor.post('/api/packages/anything/download', {})).status).toBe(401);
    expect((await visitor.get('/api/releases/rel-night-ferries/artwork/image')).status).toBe(401);
  });

  it('no page or API answer names a storage URL without a signature', async () => {
    // s3rver, our local S3 fake, serves anonymous GETs of any object, so a plain bucket URL
    // would work here; a real bucket must stay private. What we can check is that the app
    // never hands one out: the only storage URLs it gives are the signed ones above.
    const { endpoint } = inject('s3');
    const coordinator = await signedIn(demoEmails.coordinator);
    const engineer = await signedIn(demoEmails.engineer);
    const release = releaseDetailSchema.parse(
      await (await engineer.get('/api/releases/rel-night-ferries')).json(),
    );
    const paths = [
      '/releases',
      '/releases/rel-night-ferries',
      `/releases/rel-night-ferries/tracks/${release.tracks[0]?.id}`,
      '/api/releases',
      '/api/releases/rel-night-ferries',
      '/api/releases/rel-night-ferries/workflow',
      '/api/releases/rel-night-ferries/history',
      `/api/tracks/${release.tracks[0]?.id}`,
    ];
    for (const path of paths) {
      for (const client of [engineer, coordinator]) {
        const text = await (await client.get(path)).text();
        expect(text, path).not.toContain(endpoint);
        expect(text, path).not.toMatch(/X-Amz-|s3\.amazonaws|:\/\/[^"]*\/quayside\//);
      }
    }
  });
});

describe('errors and logs give nothing away', () => {
  const stackLike = /\bat .+:\d+:\d+|\/src\/|node_modules|\.ts:\d+|\.mjs:\d+/;

  it('an unexpected failure is a 500 in our error shape, without a stack', async () => {
    const coordinator = await signedIn(demoEmails.coordinator);
    const response = await whileBroken(() => coordinator.get(`/api/releases/${brokenReleaseId}`));
    expect(response.status).toBe(500);
    const text = await response.text();
    expect(JSON.parse(text)).toEqual({
      error: {
        code: 'internal',
        message: 'Something went wrong on our side; nothing was changed.',
      },
    });
    expect(text).not.toMatch(stackLike);
  });

  it('malformed JSON, wrong content types and odd paths answer plainly, without a stack', async () => {
    const admin = await signedIn(demoEmails.admin);
    const answers = [
      await admin.request('POST', '/api/members/invitations', '{"email": ', {
        'content-type': 'application/json',
      }),
      await admin.request('POST', '/api/members/invitations', '<x/>', {
        'content-type': 'application/xml',
      }),
      await admin.request('PATCH', '/api/releases/rel-night-ferries/metadata', '[1,', {
        'content-type': 'application/json',
      }),
      await admin.get(`/api/releases/${'x'.repeat(300)}`),
      await admin.get('/api/releases/%E0%A4%A'),
      await admin.get('/api/no-such-route'),
      await new Client().request('POST', '/api/auth/sign-in/email', '{"email":', {
        'content-type': 'application/json',
      }),
    ];
    for (const answer of answers) {
      expect(answer.status, answer.url).toBeGreaterThanOrEqual(400);
      expect(answer.status, answer.url).toBeLessThan(500);
      expect(await answer.text(), answer.url).not.toMatch(stackLike);
    }
  });

  it('a server process logs no password, secret or session token', async () => {
    const server = await startServerProcess();
    const wrongPassword = `wrong-${randomBytes(8).toString('hex')}`;
    const visitor = new Client(server.url);
    expect((await signInRequest(visitor, demoEmails.coordinator, wrongPassword)).status).toBe(401);
    const response = await signInRequest(visitor, demoEmails.coordinator, demoPassword);
    expect(response.status).toBe(200);
    const token = ((await response.json()) as { token: string }).token;
    const cookie =
      response.headers
        .getSetCookie()
        .find((c) => c.includes('session_token='))
        ?.split(';')[0]
        ?.split('=')[1] ?? '';
    const broken = await whileBroken(() => visitor.get(`/api/releases/${brokenReleaseId}`));
    expect(broken.status).toBe(500);
    await new Promise((r) => setTimeout(r, 500));

    const output = server.output();
    expect(output).toContain('Quayside is serving at');
    expect(output).toContain('[api] unexpected error');
    const secret = inject('serverEnv').BETTER_AUTH_SECRET ?? '';
    expect(secret.length).toBeGreaterThanOrEqual(32);
    for (const [what, value] of [
      ['the wrong password', wrongPassword],
      ['the password', demoPassword],
      ['BETTER_AUTH_SECRET', secret],
      ['the session token', token],
      ['the session cookie', decodeURIComponent(cookie)],
      ['the session cookie (encoded)', cookie],
    ] as const) {
      expect(value.length, what).toBeGreaterThan(8);
      expect(output.includes(value), `${what} appears in the server output`).toBe(false);
    }
  });
});
