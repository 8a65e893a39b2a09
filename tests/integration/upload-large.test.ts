/**
 * One large master streamed through the real server into the S3 fake. The file (over 1 GB by
 * default; UPLOAD_LARGE_TEST_BYTES overrides it) is generated as it is sent and never exists
 * on disk or in memory whole. The server runs inside the vitest main process (the global
 * setup), which is this test worker's parent, so its resident memory is read from /proc.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import { Readable } from 'node:stream';
import { GetObjectCommand } from '@aws-sdk/client-s3';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { uploadResultSchema } from '@/lib/api/schemas';
import { audioFiles } from '@/lib/db/schema';
import { demoEmails } from '../support/http';
import {
  createFixtureRelease,
  db,
  removeFixtureRelease,
  Session,
  sineFrames,
  testS3,
  uploadPath,
  waitForAnalyses,
  wavHeader,
} from './upload-support';

const totalBytes = Number(process.env.UPLOAD_LARGE_TEST_BYTES ?? 1_100_000_000);
const sampleRateHz = 48_000;
const frameBytes = 6; // 24-bit stereo
const dataBytes = Math.floor((totalBytes - 44) / frameBytes) * frameBytes;
// One second of a 1 kHz tone at −6 dBFS: a whole number of cycles, so repeating it is seamless.
const block = sineFrames({
  sampleRateHz,
  bits: 24,
  channels: 2,
  hz: 1000,
  peakDbfs: -6,
  from: 0,
  count: sampleRateHz,
});

function* generateWav(): Generator<Buffer> {
  yield wavHeader({ sampleRateHz, bits: 24, channels: 2, dataBytes });
  let left = dataBytes;
  while (left > 0) {
    const n = Math.min(left, block.length);
    yield n === block.length ? block : block.subarray(0, n);
    left -= n;
  }
}

function serverRssBytes(): number {
  const status = readFileSync(`/proc/${process.ppid}/status`, 'utf8');
  const kib = Number(/VmRSS:\s+(\d+)\s+kB/.exec(status)?.[1] ?? Number.NaN);
  return kib * 1024;
}

const releaseId = 'rel-upload-large';
let engineer: Session;

beforeAll(async () => {
  engineer = await Session.signIn(demoEmails.engineer);
  await createFixtureRelease(releaseId);
});

afterAll(async () => {
  await removeFixtureRelease(releaseId);
});

describe(`a ${(totalBytes / 1e9).toFixed(1)} GB master`, () => {
  it('streams to storage with bounded server memory, and the SHA-256 matches', {
    timeout: 600_000,
  }, async () => {
    // The server is our parent process: make sure we measure the right one.
    expect(readFileSync(`/proc/${process.ppid}/cmdline`, 'utf8')).toContain('vitest');
    const hash = createHash('sha256');
    const body = Readable.from(
      (function* () {
        for (const chunk of generateWav()) {
          hash.update(chunk);
          yield chunk;
        }
      })(),
    );
    const before = serverRssBytes();
    let peak = before;
    const sampler = setInterval(() => {
      peak = Math.max(peak, serverRssBytes());
    }, 100);
    const base = new URL(inject('baseUrl'));
    const started = Date.now();
    const answer = await new Promise<{ status: number; text: string }>((resolve, reject) => {
      const req = httpRequest(
        {
          host: base.hostname,
          port: base.port,
          method: 'POST',
          path: uploadPath(releaseId, { uploadId: crypto.randomUUID(), name: 'Long Form.wav' }),
          headers: {
            origin: base.origin,
            cookie: engineer.cookie,
            'content-type': 'audio/wav',
            'content-length': String(44 + dataBytes),
          },
        },
        (res) => {
          let text = '';
          res.setEncoding('utf8');
          res.on('data', (c: string) => {
            text += c;
          });
          res.on('end', () => resolve({ status: res.statusCode ?? 0, text }));
        },
      );
      req.on('error', reject);
      body.pipe(req);
    });
    clearInterval(sampler);
    const seconds = (Date.now() - started) / 1000;
    expect(answer.status, answer.text).toBe(201);
    const result = uploadResultSchema.parse(JSON.parse(answer.text));
    const expectedSha = hash.digest('hex');
    expect(result.sizeBytes).toBe(44 + dataBytes);
    expect(result.sha256).toBe(expectedSha);
    const growthMiB = (peak - before) / 2 ** 20;
    console.info(
      `[upload-large] ${(result.sizeBytes / 1e9).toFixed(2)} GB in ${seconds.toFixed(1)} s; server RSS ${(before / 2 ** 20).toFixed(0)} MiB before, peak ${(peak / 2 ** 20).toFixed(0)} MiB (+${growthMiB.toFixed(0)} MiB)`,
    );
    // Parts of 8 MiB, two in flight, plus the S3 fake in the same process: far below the file.
    expect(growthMiB).toBeLessThan(250);

    // The stored object, read back, has the same bytes.
    const s3 = testS3();
    const [row] = await db.select().from(audioFiles).where(eq(audioFiles.id, result.audioFileId));
    const object = await s3.client.send(
      new GetObjectCommand({ Bucket: s3.bucket, Key: row?.objectKey }),
    );
    const storedHash = createHash('sha256');
    for await (const chunk of object.Body as Readable) storedHash.update(chunk as Buffer);
    expect(storedHash.digest('hex')).toBe(expectedSha);

    const status = await waitForAnalyses(engineer, releaseId, 400_000);
    const current = status.tracks[0]?.current;
    expect(current?.analysisState, current?.analysisError ?? '').toBe('done');
    expect(current?.durationSeconds).toBeCloseTo(dataBytes / frameBytes / sampleRateHz, 3);
  });
});
