/**
 * The audio analysis engine as the server uses it: `analyzeFile` / `analyzeStream` run in a
 * shared worker pool (piscina), report progress, and can be cancelled.
 */
import type { Readable } from 'node:stream';
import builtWorkerUrl from './analysis-worker.ts?nodeworker';
import {
  type AnalyzeCallOptions,
  type AudioAnalysisPool,
  createAudioAnalysisPool,
} from './pool.ts';
import type { AudioMeasurements } from './types.ts';

export { analyzeFileInThread, analyzeStreamInThread } from './analyze-in-thread.ts';
export { AudioAnalysisError, type AudioErrorCode, isAudioAnalysisError } from './errors.ts';
export { ENGINE_VERSION } from './finalize.ts';
export type {
  AnalysisProgress,
  AnalyzeCallOptions,
  AudioAnalysisPool,
  PoolSettings,
} from './pool.ts';
export { createAudioAnalysisPool } from './pool.ts';
export type { AnalysisOptions } from './segment-analyzer.ts';
export type * from './types.ts';

/**
 * The worker module. With the Vite plugin (astro dev/build) the import above is a URL string:
 * the emitted worker chunk after a build, the tsx loader in dev. Without the plugin (e.g. a
 * vitest project that lacks it) Vite hands back the module itself, and the tsx loader beside
 * this file is used.
 */
function resolveWorkerUrl(): string {
  const imported: unknown = builtWorkerUrl;
  if (typeof imported === 'string') return imported;
  return new URL('./analysis-worker-tsx.mjs', import.meta.url).href;
}

let defaultPool: AudioAnalysisPool | null = null;

function getDefaultPool(): AudioAnalysisPool {
  defaultPool ??= createAudioAnalysisPool({ workerUrl: resolveWorkerUrl() });
  return defaultPool;
}

/** Measures a master on disk in the background pool. Rejects with AudioAnalysisError. */
export function analyzeFile(
  path: string,
  options?: AnalyzeCallOptions,
): Promise<AudioMeasurements> {
  return getDefaultPool().analyzeFile(path, options);
}

/**
 * Measures a stream (an S3 object body) read once. `sizeBytes` (Content-Length) lets a lying
 * header be caught before reading; null is allowed. Rejects with AudioAnalysisError.
 */
export function analyzeStream(
  readable: Readable,
  sizeBytes: number | null,
  options?: AnalyzeCallOptions,
): Promise<AudioMeasurements> {
  return getDefaultPool().analyzeStream(readable, sizeBytes, options);
}

/** Stops the pool's threads (tests, graceful shutdown). */
export async function closeAudioAnalysisPool(): Promise<void> {
  const pool = defaultPool;
  defaultPool = null;
  await pool?.destroy();
}
