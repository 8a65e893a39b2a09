/** Generated masters and raw HTTP helpers for the upload tests. Nothing is stored in the repo. */
import { request as httpRequest } from 'node:http';
import { eq, inArray } from 'drizzle-orm';
import { expect, inject } from 'vitest';
import { type UploadStatus, uploadStatusSchema } from '@/lib/api/schemas';
import { pcmWavHeader } from '@/lib/audio/wav-header';
import { createDatabase } from '@/lib/db/client';
import { recordings, releaseProfiles, releases, tracks } from '@/lib/db/schema';
import { createS3Client } from '@/lib/storage/s3';
import { demoPassword } from '../support/http';

export const db = createDatabase(inject('databaseUrl'));

export function testS3() {
  const { endpoint, bucket } = inject('s3');
  return {
    bucket,
    client: createS3Client({
      endpoint,
      bucket,
      region: 'us-east-1',
      accessKeyId: 'S3RVER',
      secretAccessKey: 'S3RVER',
    }),
  };
}

/** A canonical 44-byte WAV header for PCM integer audio. */
export const wavHeader = pcmWavHeader;

/**
 * PCM frames of a sine (same in every channel) at `peakDbfs`, from frame `from` for `count`
 * frames, as little-endian integers. `clipEverySeconds` forces short full-scale runs.
 */
export function sineFrames(options: {
  sampleRateHz: number;
  bits: 16 | 24;
  channels: number;
  hz: number;
  peakDbfs: number;
  from: number;
  count: number;
}): Buffer {
  const { sampleRateHz, bits, channels, hz, peakDbfs, from, count } = options;
  const bytes = bits / 8;
  const out = Buffer.alloc(count * channels * bytes);
  const full = 2 ** (bits - 1) - 1;
  const amplitude = 10 ** (peakDbfs / 20) * full;
  let offset = 0;
  for (let i = 0; i < count; i++) {
    const value = Math.round(amplitude * Math.sin((2 * Math.PI * hz * (from + i)) / sampleRateHz));
    for (let c = 0; c < channels; c++) {
      if (bits === 16) out.writeInt16LE(value, offset);
      else out.writeIntLE(value, offset, 3);
      offset += bytes;
    }
  }
  return out;
}

/** A whole WAV of a sine: `seconds` long, stereo unless said. */
export function sineWav(options: {
  seconds: number;
  sampleRateHz?: number;
  bits?: 16 | 24;
  channels?: number;
  hz?: number;
  peakDbfs?: number;
}): Buffer {
  const sampleRateHz = options.sampleRateHz ?? 48_000;
  const bits = options.bits ?? 24;
  const channels = options.channels ?? 2;
  const count = Math.round(options.seconds * sampleRateHz);
  const data = sineFrames({
    sampleRateHz,
    bits,
    channels,
    hz: options.hz ?? 997,
    peakDbfs: options.peakDbfs ?? -20,
    from: 0,
    count,
  });
  return Buffer.concat([wavHeader({ sampleRateHz, bits, channels, dataBytes: data.length }), data]);
}

/** Creates a draft release of the demo label for one test file; returns its id. */
export async function createFixtureRelease(id: string, profiles: string[] = []): Promise<string> {
  const [demo] = await db
    .select({ organizationId: releases.organizationId })
    .from(releases)
    .where(eq(releases.id, 'rel-tideline'));
  if (!demo) throw new Error('the demo seed is missing rel-tideline');
  await db.insert(releases).values({
    id,
    organizationId: demo.organizationId,
    title: `Upload fixture ${id}`,
    artist: 'Fixture Artist',
    labelName: 'Brackwater Sound',
  });
  for (const profileId of profiles)
    await db.insert(releaseProfiles).values({ releaseId: id, profileId });
  return id;
}

export function uploadPath(
  releaseId: string,
  options: { uploadId: string; name: string; trackId?: string },
) {
  const query = new URLSearchParams({ uploadId: options.uploadId, name: options.name });
  if (options.trackId) query.set('trackId', options.trackId);
  return `/api/releases/${releaseId}/uploads?${query}`;
}

/** A signed-in session that can send raw bodies (the shared Client sends JSON only). */
export class Session {
  readonly baseUrl: string;
  cookie = '';

  /** `baseUrl` defaults to the test server; a second server process passes its own. */
  constructor(baseUrl: string = inject('baseUrl')) {
    this.baseUrl = baseUrl;
  }

  static async signIn(email: string, baseUrl?: string): Promise<Session> {
    const session = new Session(baseUrl);
    const response = await session.fetch('/api/auth/sign-in/email', {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email, password: demoPassword }),
    });
    if (response.status !== 200) throw new Error(`sign-in as ${email}: ${response.status}`);
    return session;
  }

  async fetch(path: string, init: RequestInit = {}): Promise<Response> {
    const response = await fetch(new URL(path, this.baseUrl), {
      redirect: 'manual',
      ...init,
      headers: {
        origin: this.baseUrl,
        cookie: this.cookie,
        ...(init.headers as Record<string, string>),
      },
    });
    const set = response.headers.getSetCookie();
    if (set.length) {
      const jar = new Map(
        this.cookie
          .split('; ')
          .filter(Boolean)
          .map((c) => c.split('=', 2) as [string, string]),
      );
      for (const cookie of set) {
        const [pair] = cookie.split(';');
        const [name, ...value] = (pair ?? '').split('=');
        if (name) jar.set(name.trim(), value.join('='));
      }
      this.cookie = [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
    }
    return response;
  }

  get(path: string, headers: Record<string, string> = {}) {
    return this.fetch(path, { headers });
  }

  /** POSTs `body` as a master upload. */
  upload(
    releaseId: string,
    body: Buffer,
    options: { name: string; trackId?: string; uploadId?: string; contentType?: string },
  ): Promise<Response> {
    const path = uploadPath(releaseId, {
      uploadId: options.uploadId ?? crypto.randomUUID(),
      ...options,
    });
    return this.fetch(path, {
      method: 'POST',
      headers: { 'content-type': options.contentType ?? 'audio/wav' },
      body: new Blob([new Uint8Array(body)]),
    });
  }
}

export async function uploadStatus(client: Session, releaseId: string): Promise<UploadStatus> {
  const response = await client.get(`/api/releases/${releaseId}/uploads`);
  expect(response.status).toBe(200);
  return uploadStatusSchema.parse(await response.json());
}

/** Waits until no file of the release is pending or running; returns the last status. */
export async function waitForAnalyses(client: Session, releaseId: string, timeoutMs = 60_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const status = await uploadStatus(client, releaseId);
    const busy = status.tracks.some(
      (t) =>
        t.current &&
        (t.current.analysisState === 'pending' || t.current.analysisState === 'running'),
    );
    if (!busy) return status;
    if (Date.now() > deadline) throw new Error('analyses did not finish in time');
    await new Promise((r) => setTimeout(r, 200));
  }
}

/**
 * Starts a raw HTTP upload that declares `declaredBytes` but sends only `sendBytes`, then
 * resolves once those bytes are written. `finish` drops the connection.
 */
export function startPartialUpload(options: {
  path: string;
  cookie: string;
  declaredBytes: number;
  first: Buffer;
}): Promise<{ drop(): void; response: Promise<number | null> }> {
  const base = new URL(inject('baseUrl'));
  return new Promise((resolve, reject) => {
    const req = httpRequest({
      host: base.hostname,
      port: base.port,
      method: 'POST',
      path: options.path,
      headers: {
        origin: base.origin,
        cookie: options.cookie,
        'content-type': 'audio/wav',
        'content-length': String(options.declaredBytes),
      },
    });
    const response = new Promise<number | null>((res) => {
      req.on('response', (r) => {
        r.resume();
        res(r.statusCode ?? null);
      });
      req.on('error', () => res(null));
    });
    req.on('error', () => undefined);
    req.write(options.first, (error) => {
      if (error) reject(error);
      else resolve({ drop: () => req.destroy(), response });
    });
  });
}

/** A 16-bit stereo sine WAV with full-scale runs of `runSamples` at each of `clipAtSeconds`. */
export function clippedWav(options: {
  seconds: number;
  clipAtSeconds: number[];
  runSamples?: number;
}): Buffer {
  const sampleRateHz = 44_100;
  const wav = sineWav({ seconds: options.seconds, sampleRateHz, bits: 16, peakDbfs: -3, hz: 440 });
  for (const at of options.clipAtSeconds) {
    const first = Math.round(at * sampleRateHz);
    for (let i = first; i < first + (options.runSamples ?? 6); i++) {
      wav.writeInt16LE(32767, 44 + i * 4);
      wav.writeInt16LE(32767, 44 + i * 4 + 2);
    }
  }
  return wav;
}

/**
 * Deletes a fixture release with its tracks, recordings and file rows (uploads cascade), so
 * tests that count every row of a table (tests/integration/api.test.ts) see only the demo.
 */
export async function removeFixtureRelease(id: string): Promise<void> {
  const rows = await db
    .select({ recordingId: tracks.recordingId })
    .from(tracks)
    .where(eq(tracks.releaseId, id));
  await db.delete(releases).where(eq(releases.id, id));
  const recordingIds = rows.map((r) => r.recordingId);
  if (recordingIds.length) await db.delete(recordings).where(inArray(recordings.id, recordingIds));
}
