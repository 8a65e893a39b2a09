/**
 * The worker pool: progress arrives, cancelling rejects with 'cancelled', and results equal
 * the in-thread analysis (exactly for one segment; to rounding when a file is split by time).
 * Workers load the TypeScript source through analysis-worker-tsx.mjs, as under `astro dev`.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeFileInThread } from '../../src/lib/audio/analyze-in-thread.ts';
import { AudioAnalysisError } from '../../src/lib/audio/errors.ts';
import { type AudioAnalysisPool, createAudioAnalysisPool } from '../../src/lib/audio/pool.ts';
import type { AudioMeasurements } from '../../src/lib/audio/types.ts';
import { concat, pinkNoise, silence, sine, toReadable, writeWav } from './support/signals.ts';

const workerUrl = new URL('../../src/lib/audio/analysis-worker-tsx.mjs', import.meta.url);
let dir = '';
let pool: AudioAnalysisPool;
let shortPath = '';
let longPath = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'quayside-pool-'));
  pool = createAudioAnalysisPool({ workerUrl, maxThreads: 2 });
  const fs = 48_000;
  const short = concat(silence(fs, 0.5), pinkNoise(fs, 8, -16, 1), sine(fs, 2, 997, 0.99));
  shortPath = join(dir, 'short.wav');
  writeFileSync(shortPath, writeWav([short, short.map((v) => v * 0.5)], fs, { format: 'int24' }));
  // Over MIN_SPLIT_SECONDS (30 s), so the pool splits it in two; clipping across the middle.
  const left = concat(
    pinkNoise(fs, 20, -14, 2),
    sine(fs, 1, fs / 4, 1.2, Math.PI / 4),
    pinkNoise(fs, 20, -20, 3),
  );
  const right = concat(
    pinkNoise(fs, 20, -15, 4),
    sine(fs, 1, 1000, 0.5),
    pinkNoise(fs, 20, -19, 5),
  );
  for (let i = 0; i < 3000; i++) left[Math.round(20.5 * fs) - 1500 + i] = 1;
  longPath = join(dir, 'long.wav');
  writeFileSync(longPath, writeWav([left, right], fs, { format: 'int24' }));
});

afterAll(async () => {
  await pool?.destroy();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** Every number equal to `digits` significant places; everything else exactly equal. */
function expectNearlyEqual(actual: unknown, expected: unknown, path = 'result'): void {
  if (typeof expected === 'number' && typeof actual === 'number') {
    const scale = Math.max(1, Math.abs(expected));
    expect(Math.abs(actual - expected) / scale, path).toBeLessThan(1e-9);
  } else if (Array.isArray(expected)) {
    expect(Array.isArray(actual), path).toBe(true);
    expect((actual as unknown[]).length, path).toBe(expected.length);
    for (const [i, v] of expected.entries())
      expectNearlyEqual((actual as unknown[])[i], v, `${path}[${i}]`);
  } else if (expected !== null && typeof expected === 'object') {
    expect(Object.keys(actual as object).sort(), path).toEqual(Object.keys(expected).sort());
    for (const [k, v] of Object.entries(expected))
      expectNearlyEqual((actual as Record<string, unknown>)[k], v, `${path}.${k}`);
  } else {
    expect(actual, path).toEqual(expected);
  }
}

describe('worker pool', () => {
  it('gives exactly the in-thread result for a file measured in one segment', async () => {
    const [viaPool, inThread] = await Promise.all([
      pool.analyzeFile(shortPath),
      analyzeFileInThread(shortPath),
    ]);
    expect(viaPool).toEqual(inThread);
  });

  it('splits a long file across two workers and agrees with the in-thread result', async () => {
    const progress: { bytesDone: number; bytesTotal: number }[] = [];
    const viaPool = await pool.analyzeFile(longPath, { onProgress: (p) => progress.push(p) });
    const inThread: AudioMeasurements = await analyzeFileInThread(longPath);
    expectNearlyEqual(viaPool, inThread);
    expect(viaPool.channels[0]!.clipping.runs).toEqual([
      { atSeconds: 20.5 - 1500 / 48_000, lengthSamples: 3000 },
    ]);
    // Progress: starts at 0, only grows, ends at the total.
    expect(progress.length).toBeGreaterThan(2);
    expect(progress[0]!.bytesDone).toBe(0);
    for (let i = 1; i < progress.length; i++)
      expect(progress[i]!.bytesDone).toBeGreaterThanOrEqual(progress[i - 1]!.bytesDone);
    expect(progress.at(-1)!.bytesDone).toBe(progress.at(-1)!.bytesTotal);
  });

  it('measures a stream in a worker with the same result as the file', async () => {
    const bytes = readFileSync(shortPath);
    const progress: number[] = [];
    const viaStream = await pool.analyzeStream(toReadable(bytes, 50_001), bytes.length, {
      onProgress: (p) => progress.push(p.bytesDone),
    });
    expect(viaStream).toEqual(await analyzeFileInThread(shortPath));
    expect(progress.at(-1)).toBe(bytes.length);
  });

  it('rejects with a typed error for a bad file', async () => {
    const path = join(dir, 'bad.wav');
    writeFileSync(path, Buffer.from('not audio at all, just some text that is long enough'));
    await expect(pool.analyzeFile(path)).rejects.toMatchObject({ code: 'not-audio' });
  });

  it('cancels a file analysis when the signal aborts, with code "cancelled"', async () => {
    const controller = new AbortController();
    const running = pool.analyzeFile(longPath, {
      signal: controller.signal,
      onProgress: (p) => {
        if (p.bytesDone > 0) controller.abort();
      },
    });
    const error = await running.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(AudioAnalysisError);
    expect((error as AudioAnalysisError).code).toBe('cancelled');
    // The pool still works afterwards.
    expect((await pool.analyzeFile(shortPath)).format.channels).toBe(2);
  });

  it('cancels a stream analysis, and refuses an already-aborted signal', async () => {
    const bytes = readFileSync(longPath);
    const controller = new AbortController();
    const running = pool.analyzeStream(toReadable(bytes, 65_536), bytes.length, {
      signal: controller.signal,
      onProgress: (p) => {
        if (p.bytesDone > 1_000_000) controller.abort();
      },
    });
    await expect(running).rejects.toMatchObject({ code: 'cancelled' });
    await expect(
      pool.analyzeFile(shortPath, { signal: AbortSignal.abort() }),
    ).rejects.toMatchObject({ code: 'cancelled' });
  });
});
