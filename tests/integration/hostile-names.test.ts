/**
 * Hostile file names (tests/support/hostile-names.ts) through the real upload API, to a
 * fixture release, and everywhere the name goes next:
 *
 * - each upload is accepted with a sanitized display name or refused with a clear 400, never
 *   a 5xx; the artwork upload does the same with X-File-Name;
 * - object keys in the S3 fake are made of ids only;
 * - names the API returns carry no control or bidirectional characters, and the component
 *   that shows them escapes HTML (the release and track pages are rendered in the browser,
 *   so their server HTML never holds the name at all, which is checked too);
 * - the download's Content-Disposition is well-formed (RFC 6266 filename + RFC 8187
 *   filename*), with no CR/LF and no quote breaking out, and names the file exactly;
 * - the package built from the release has zip entry names with no "..", no absolute path,
 *   no backslash and no control character (Debian's unzip lists and tests it).
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { HeadObjectCommand, ListObjectsV2Command } from '@aws-sdk/client-s3';
import { eq, inArray } from 'drizzle-orm';
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { VersionList } from '@/components/track/VersionList';
import { artworkResponseSchema } from '@/lib/api/metadata-schemas';
import {
  apiErrorSchema,
  releaseDetailSchema,
  trackDetailSchema,
  uploadResultSchema,
} from '@/lib/api/schemas';
import { workflowStatusSchema } from '@/lib/api/workflow-schemas';
import { audioFiles, packages, tracks } from '@/lib/db/schema';
import { sanitizeDisplayName } from '@/lib/server/uploads/files';
import { downloadPackageZip } from '../support/bagit';
import { hostileNames } from '../support/hostile-names';
import { demoEmails } from '../support/http';
import { ensureProgram } from '../support/system-packages';
import { makePng } from '../unit/metadata/images';
import {
  createFixtureRelease,
  db,
  removeFixtureRelease,
  Session,
  sineWav,
  testS3,
  waitForAnalyses,
} from './upload-support';

const releaseId = 'rel-hostile-names';
const s3 = testS3();
const controlOrBidi = /[\p{Cc}\p{Cf}\p{Cs}]/u;
/** What a query string carries of a name: lone surrogates cannot be UTF-8, so U+FFFD. */
const asSent = (name: string) => name.replace(/\p{Cs}/gu, '\uFFFD');

let admin: Session;
let dir = '';
const accepted: { raw: string; result: ReturnType<typeof uploadResultSchema.parse> }[] = [];

beforeAll(async () => {
  ensureProgram('/usr/bin/unzip', ['unzip']);
  dir = await mkdtemp(join(tmpdir(), 'quayside-hostile-'));
  // Pre-limiter: a −20 dBFS 24-bit sine passes every rule, so the release can be approved.
  await createFixtureRelease(releaseId, ['pre-limiter']);
  admin = await Session.signIn(demoEmails.admin);
}, 60_000);

afterAll(async () => {
  await removeFixtureRelease(releaseId);
  if (dir) await rm(dir, { recursive: true, force: true });
});

async function expectApiError(response: Response, status: number, label: string) {
  expect(response.status, label).toBe(status);
  const body = apiErrorSchema.parse(await response.json());
  expect(body.error.message.length, label).toBeGreaterThan(10);
  expect(JSON.stringify(body), label).not.toMatch(/\n\s+at\s|node_modules/);
}

describe('uploading masters under hostile names', () => {
  const wav = sineWav({ seconds: 0.2 });

  it('accepts each with a clean display name, or refuses it with a 400', async () => {
    for (const raw of hostileNames) {
      const label = JSON.stringify(raw);
      const response = await admin.upload(releaseId, wav, { name: raw });
      expect(response.status, label).toBeLessThan(500);
      const expected = raw === '' ? null : sanitizeDisplayName(asSent(raw));
      if (expected === null) {
        await expectApiError(response, 400, label);
        continue;
      }
      expect(response.status, label).toBe(201);
      const result = uploadResultSchema.parse(await response.json());
      expect(result.originalName, label).toBe(expected);
      expect(result.originalName, label).not.toMatch(controlOrBidi);
      expect(result.originalName, label).not.toMatch(/[\\/]/);
      accepted.push({ raw, result });
    }
    expect(accepted.length).toBeGreaterThan(hostileNames.length - 10);
    // Both normalisation forms of "Café.wav" are stored as the same (NFC) name.
    const cafes = accepted.filter((a) => a.raw.normalize('NFC') === 'Caf\u00e9.wav');
    expect(cafes.map((a) => a.result.originalName)).toEqual(['Caf\u00e9.wav', 'Caf\u00e9.wav']);
  }, 120_000);

  it('stores every object under a key made of ids only', async () => {
    const ids = accepted.map((a) => a.result.audioFileId);
    const rows = await db.select().from(audioFiles).where(inArray(audioFiles.id, ids));
    expect(rows).toHaveLength(ids.length);
    for (const row of rows) {
      expect(row.objectKey).toMatch(/^audio\/[A-Za-z0-9-]+\/[0-9a-f-]{36}\.(wav|aif)$/);
      expect(row.objectKey).toContain(row.id);
      await s3.client.send(new HeadObjectCommand({ Bucket: s3.bucket, Key: row.objectKey }));
    }
    // Nothing in the whole bucket was named after a file: every key is ids and fixed words.
    let token: string | undefined;
    do {
      const page = await s3.client.send(
        new ListObjectsV2Command({ Bucket: s3.bucket, ContinuationToken: token }),
      );
      for (const { Key } of page.Contents ?? []) {
        expect(Key).toMatch(/^[A-Za-z0-9._/-]+$/);
        expect(Key?.split('/')).not.toContain('..');
        expect(Key).not.toMatch(/passwd|script|CON\.wav|hidden/i);
      }
      token = page.NextContinuationToken;
    } while (token);
  });

  it('shows only clean names through the API, and the version list escapes HTML', async () => {
    await waitForAnalyses(admin, releaseId, 120_000);
    const release = releaseDetailSchema.parse(
      await (await admin.get(`/api/releases/${releaseId}`)).json(),
    );
    for (const track of release.tracks) {
      expect(track.title).not.toMatch(controlOrBidi);
      expect(track.audio?.originalName ?? '').not.toMatch(controlOrBidi);
    }
    // "<script>…</script>.wav" keeps only "script>.wav" (its "/" starts a new path segment);
    // "<img src=x onerror=alert(1)>.wav" is kept whole, as text.
    expect(accepted.find((a) => a.raw.startsWith('<script>'))?.result.originalName).toBe(
      'script>.wav',
    );
    const html = accepted.find((a) => a.raw.startsWith('<img'));
    expect(html).toBeDefined();
    const detail = trackDetailSchema.parse(
      await (await admin.get(`/api/tracks/${html?.result.trackId}`)).json(),
    );
    expect(detail.versions[0]?.originalName).toBe('<img src=x onerror=alert(1)>.wav');
    const markup = renderToStaticMarkup(
      createElement(VersionList, { versions: detail.versions, canDownload: true }),
    );
    expect(markup).toContain('&lt;img src=x onerror=alert(1)&gt;.wav');
    expect(markup).not.toContain('<img');

    for (const page of [
      `/releases/${releaseId}`,
      `/releases/${releaseId}/tracks/${html?.result.trackId}`,
    ]) {
      const response = await admin.get(page);
      expect(response.status, page).toBe(200);
      const text = await response.text();
      expect(text, page).not.toContain('<script>alert(1)');
      expect(text, page).not.toContain('<img src=x onerror');
    }
  }, 150_000);

  it('downloads each file with a well-formed Content-Disposition naming it exactly', async () => {
    for (const { raw, result } of accepted) {
      const response = await admin.get(`/api/audio/${result.audioFileId}/download`);
      expect(response.status, raw).toBe(302);
      const location = new URL(response.headers.get('location') ?? '');
      const asked = location.searchParams.get('response-content-disposition') ?? '';
      const stored = await fetch(location);
      expect(stored.status, raw).toBe(200);
      await stored.arrayBuffer();
      // What was signed is what the store sends (s3rver honours response-content-disposition).
      const header = stored.headers.get('content-disposition') ?? '';
      expect(header, raw).toBe(asked);
      expect(header, raw).toMatch(/^[\x20-\x7e]+$/);
      const match =
        /^attachment; filename="([^"\\]*)"; filename\*=UTF-8''((?:[A-Za-z0-9!#$&+\-.^_`|~]|%[0-9A-F]{2})+)$/.exec(
          header,
        );
      expect(match, `${raw}: ${header}`).not.toBeNull();
      expect(decodeURIComponent(match?.[2] ?? ''), raw).toBe(result.originalName);
    }
  }, 120_000);
});

describe('cover art under hostile names', () => {
  const png = makePng(3000, 3000, 2);
  const names = hostileNames.filter((_, i) => i % 4 === 0).concat(['%E0%A4%A', '%']);

  it('keeps a clean display name, or refuses a malformed header with a 400', async () => {
    for (const raw of names) {
      const encoded = /^%/.test(raw) ? raw : encodeURIComponent(asSent(raw));
      const response = await admin.fetch(`/api/releases/${releaseId}/artwork`, {
        method: 'POST',
        headers: { 'content-type': 'image/png', 'x-file-name': encoded },
        body: new Uint8Array(png),
      });
      const label = `${JSON.stringify(raw)} sent as ${encoded.slice(0, 60)}`;
      expect(response.status, label).toBeLessThan(500);
      if (response.status === 400) {
        await expectApiError(response, 400, label);
        continue;
      }
      expect(response.status, label).toBe(201);
      const { artwork } = artworkResponseSchema.parse(await response.json());
      expect(artwork?.originalName, label).not.toMatch(controlOrBidi);
      expect(artwork?.originalName, label).not.toMatch(/[\\/]/);
      expect(artwork?.originalName.length, label).toBeGreaterThan(0);
    }
  }, 120_000);
});

describe('the package of a release with hostile names', () => {
  it('has zip entry names with no "..", no absolute path, no backslash', async () => {
    const post = (path: string, body: unknown = {}) =>
      admin.fetch(path, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify(body),
      });
    const status = async () =>
      workflowStatusSchema.parse(
        await (await admin.get(`/api/releases/${releaseId}/workflow`)).json(),
      );
    expect(
      (await post(`/api/releases/${releaseId}/submit`, { version: (await status()).version }))
        .status,
    ).toBe(200);
    expect((await post(`/api/releases/${releaseId}/checks`)).status).toBe(201);
    expect((await post(`/api/releases/${releaseId}/sign-off/audio`)).status).toBe(200);
    expect((await post(`/api/releases/${releaseId}/sign-off/metadata`)).status).toBe(200);
    const ready = await status();
    expect(ready.approvable, JSON.stringify(ready.blockers)).toBe(true);
    expect(
      (await post(`/api/releases/${releaseId}/approve`, { version: ready.version })).status,
    ).toBe(200);

    let row: typeof packages.$inferSelect | undefined;
    for (let i = 0; i < 300; i++) {
      [row] = await db.select().from(packages).where(eq(packages.releaseId, releaseId));
      if (row && row.state !== 'building') break;
      await new Promise((r) => setTimeout(r, 200));
    }
    expect(row?.state).toBe('ready');
    const zip = await downloadPackageZip(s3, row?.objectKey ?? '', join(dir, 'package.zip'));
    const entries = execFileSync('zipinfo', ['-1', zip], { encoding: 'utf8' }).trim().split('\n');
    const trackCount = (await db.select().from(tracks).where(eq(tracks.releaseId, releaseId)))
      .length;
    expect(entries.filter((e) => e.includes('/data/audio/'))).toHaveLength(trackCount);
    for (const entry of entries) {
      expect(entry).not.toMatch(/^\/|^[A-Za-z]:/);
      expect(entry).not.toContain('\\');
      expect(entry.split('/')).not.toContain('..');
      expect(
        [...entry].some((c) => c < ' ' || c === '\u007f'),
        entry,
      ).toBe(false);
      expect(entry).toMatch(/^[A-Za-z0-9._-]+-v1\//);
    }
    for (const audio of entries.filter((e) => e.includes('/data/audio/'))) {
      expect(audio).toMatch(
        /\/data\/audio\/\d{2} [A-Za-z0-9 ._()-]+ - [A-Za-z0-9 ._()-]+\.(wav|aif|aiff)$/,
      );
    }
  }, 180_000);
});
