import { availableParallelism } from 'node:os';
import type { Readable } from 'node:stream';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { AnalysisTask, AnalysisTaskResult } from './analysis-worker.ts';
import { streamTruncated } from './analyze-in-thread.ts';
import { openFileSource, StreamByteSource } from './byte-source.ts';
import { parseContainer } from './container.ts';
import { AudioAnalysisError, reviveAudioAnalysisError } from './errors.ts';
import { finalizeMeasurements } from './finalize.ts';
import { countSegmentBytes, planSegments } from './read-segment.ts';
import { type AnalysisOptions, resolveOptions, type SegmentResult } from './segment-analyzer.ts';
import type { AudioMeasurements } from './types.ts';

export interface AnalysisProgress {
  bytesDone: number;
  bytesTotal: number;
}

export interface AnalyzeCallOptions extends AnalysisOptions {
  onProgress?: (progress: AnalysisProgress) => void;
  /** Aborting rejects with AudioAnalysisError code 'cancelled' and stops the worker. */
  signal?: AbortSignal;
}

export interface AudioAnalysisPool {
  /** Measures a file; long files are split by time across the pool's threads. */
  analyzeFile(path: string, options?: AnalyzeCallOptions): Promise<AudioMeasurements>;
  /** Measures a stream (e.g. an S3 object body) read once, in one worker. */
  analyzeStream(
    readable: Readable,
    sizeBytes: number | null,
    options?: AnalyzeCallOptions,
  ): Promise<AudioMeasurements>;
  destroy(): Promise<void>;
}

export interface PoolSettings {
  /** The worker module: the compiled worker, or analysis-worker-tsx.mjs where TypeScript runs uncompiled. */
  workerUrl: URL | string;
  /** Threads; default min(2, cores) — one file split in two took the prototype 1.3–1.6× faster (PERFORMANCE.md). */
  maxThreads?: number;
  /** Segments per long file; default maxThreads. */
  splitParts?: number;
}

// Credit-based flow control for streams: at most this many chunks in flight to the worker.
const STREAM_CHUNKS_IN_FLIGHT = 4;
const STREAM_CHUNK_BYTES = 1 << 20;

function createCancelledError(): AudioAnalysisError {
  return new AudioAnalysisError('cancelled', 'The analysis was cancelled.');
}

function unwrap(result: AnalysisTaskResult): SegmentResult {
  if (result.ok) return result.segment;
  throw (
    reviveAudioAnalysisError(result.error) ??
    new AudioAnalysisError('read-failed', result.error.message)
  );
}

function isAbortError(error: unknown): boolean {
  return error instanceof Error && (error.name === 'AbortError' || /abort/i.test(error.message));
}

export function createAudioAnalysisPool(settings: PoolSettings): AudioAnalysisPool {
  const maxThreads = Math.max(1, settings.maxThreads ?? Math.min(2, availableParallelism()));
  const splitParts = settings.splitParts ?? maxThreads;
  const filename = settings.workerUrl instanceof URL ? settings.workerUrl.href : settings.workerUrl;
  let pool: Piscina | null = null;
  const getPool = (): Piscina => {
    pool ??= new Piscina({ filename, maxThreads, minThreads: 0, idleTimeout: 30_000 });
    return pool;
  };

  const runTask = async (
    task: AnalysisTask,
    transferList: Transferable[],
    signal?: AbortSignal,
  ): Promise<SegmentResult> => {
    try {
      const result = (await getPool().run(task, {
        transferList: transferList as never,
        ...(signal ? { signal } : {}),
      })) as AnalysisTaskResult;
      return unwrap(result);
    } catch (error) {
      if (signal?.aborted || isAbortError(error)) throw createCancelledError();
      throw error;
    }
  };

  return {
    async analyzeFile(path, options = {}) {
      const { onProgress, signal, ...analysisOptions } = options;
      if (signal?.aborted) throw createCancelledError();
      const resolved = resolveOptions(analysisOptions);
      const source = await openFileSource(path);
      let parsed: Awaited<ReturnType<typeof parseContainer>>;
      try {
        parsed = await parseContainer(source);
      } finally {
        await source.close();
      }
      if (signal?.aborted) throw createCancelledError();
      const plans = planSegments(parsed.info, splitParts, resolved);
      const bytesTotal = plans.reduce((n, plan) => n + countSegmentBytes(plan), 0);
      let bytesDone = 0;
      onProgress?.({ bytesDone, bytesTotal });
      // Aborting one task must stop the others too.
      const controller = new AbortController();
      const onAbort = (): void => controller.abort();
      signal?.addEventListener('abort', onAbort, { once: true });
      const ports: MessagePort[] = [];
      try {
        const segments = await Promise.all(
          plans.map((plan) => {
            const channel = new MessageChannel();
            ports.push(channel.port1 as unknown as MessagePort);
            channel.port1.on('message', (message: { bytes: number }) => {
              bytesDone += message.bytes;
              onProgress?.({ bytesDone: Math.min(bytesDone, bytesTotal), bytesTotal });
            });
            const task: AnalysisTask = {
              kind: 'file-segment',
              path,
              plan,
              progressPort: channel.port2,
            };
            return runTask(task, [channel.port2 as unknown as Transferable], controller.signal);
          }),
        ).catch((error: unknown) => {
          controller.abort();
          throw signal?.aborted ? createCancelledError() : error;
        });
        return finalizeMeasurements(parsed.info, segments, resolved);
      } finally {
        signal?.removeEventListener('abort', onAbort);
        for (const port of ports) port.close();
      }
    },

    async analyzeStream(readable, sizeBytes, options = {}) {
      const { onProgress, signal, ...analysisOptions } = options;
      if (signal?.aborted) {
        readable.destroy();
        throw createCancelledError();
      }
      const resolved = resolveOptions(analysisOptions);
      const source = new StreamByteSource(readable, sizeBytes);
      let wake: (() => void) | null = null;
      let workerDone = false;
      const onAbort = (): void => {
        readable.destroy();
        wake?.();
      };
      signal?.addEventListener('abort', onAbort, { once: true });
      try {
        const parsed = await parseContainer(source).catch((error: unknown) => {
          throw signal?.aborted ? createCancelledError() : error;
        });
        const [plan] = planSegments(parsed.info, 1, resolved);
        const channel = new MessageChannel();
        const port = channel.port1;
        const bytesTotal = sizeBytes ?? parsed.info.dataOffset + parsed.info.dataBytes;
        let inFlight = 0;
        port.on('message', () => {
          inFlight--;
          wake?.();
        });
        const task: AnalysisTask = { kind: 'port-stream', plan: plan!, dataPort: channel.port2 };
        const result = runTask(task, [channel.port2 as unknown as Transferable], signal);
        // Keep the rejection observed while the pump below runs, and stop waiting for acks
        // from a worker that has already finished or failed.
        result
          .catch(() => undefined)
          .finally(() => {
            workerDone = true;
            wake?.();
          });
        const pump = async (): Promise<void> => {
          let position = parsed.info.dataOffset;
          const end = parsed.info.dataOffset + parsed.info.dataBytes;
          while (position < end) {
            if (signal?.aborted) throw createCancelledError();
            const chunk = await source.take(position, Math.min(STREAM_CHUNK_BYTES, end - position));
            if (chunk.length === 0) {
              if (signal?.aborted) throw createCancelledError();
              throw streamTruncated(parsed.info.dataBytes, position - parsed.info.dataOffset);
            }
            // A copy, since the chunk may share its memory with other buffers (Buffer#slice
            // would not copy), and the transfer below detaches what it sends.
            const copy = new Uint8Array(chunk.length);
            copy.set(chunk);
            const bytes = copy.buffer;
            while (inFlight >= STREAM_CHUNKS_IN_FLIGHT && !workerDone && !signal?.aborted) {
              await new Promise<void>((resolve) => {
                wake = resolve;
              });
              wake = null;
            }
            if (signal?.aborted) throw createCancelledError();
            if (workerDone) return;
            inFlight++;
            port.postMessage({ bytes }, [bytes]);
            position += chunk.length;
            onProgress?.({ bytesDone: Math.min(position, bytesTotal), bytesTotal });
          }
          port.postMessage({ end: true });
        };
        try {
          await pump();
        } catch (error) {
          // Let the worker finish its task so the thread returns to the pool.
          port.postMessage({ end: true });
          await result.catch(() => undefined);
          port.close();
          throw error;
        }
        const segment = await result;
        port.close();
        await parsed.readTrailingChunks();
        onProgress?.({ bytesDone: bytesTotal, bytesTotal });
        return finalizeMeasurements(parsed.info, [segment], resolved);
      } finally {
        signal?.removeEventListener('abort', onAbort);
        await source.close();
      }
    },

    async destroy() {
      const current = pool;
      pool = null;
      await current?.destroy();
    },
  };
}
