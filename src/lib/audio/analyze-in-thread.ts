import type { Readable } from 'node:stream';
import { openFileSource, StreamByteSource } from './byte-source.ts';
import { parseContainer } from './container.ts';
import { AudioAnalysisError } from './errors.ts';
import { finalizeMeasurements } from './finalize.ts';
import { measureFileSegment, planSegments } from './read-segment.ts';
import { type AnalysisOptions, resolveOptions, SegmentAnalyzer } from './segment-analyzer.ts';
import type { AudioMeasurements } from './types.ts';

/**
 * Measures a file on the calling thread (tests, scripts). The server uses the worker pool
 * (`analyzeFile` in index.ts) so requests keep flowing while a file is measured.
 */
export async function analyzeFileInThread(
  path: string,
  options: AnalysisOptions = {},
): Promise<AudioMeasurements> {
  const resolved = resolveOptions(options);
  const source = await openFileSource(path);
  let parsed: Awaited<ReturnType<typeof parseContainer>>;
  try {
    parsed = await parseContainer(source);
  } finally {
    await source.close();
  }
  const [plan] = planSegments(parsed.info, 1, resolved);
  const segment = measureFileSegment(path, plan!);
  return finalizeMeasurements(parsed.info, [segment], resolved);
}

/** Measures a Node Readable (e.g. an S3 object body) on the calling thread, reading it once. */
export async function analyzeStreamInThread(
  readable: Readable,
  sizeBytes: number | null,
  options: AnalysisOptions = {},
): Promise<AudioMeasurements> {
  const resolved = resolveOptions(options);
  const source = new StreamByteSource(readable, sizeBytes);
  try {
    const parsed = await parseContainer(source);
    const [plan] = planSegments(parsed.info, 1, resolved);
    const analyzer = new SegmentAnalyzer(plan!);
    let position = parsed.info.dataOffset;
    const end = parsed.info.dataOffset + parsed.info.dataBytes;
    while (position < end) {
      const chunk = await source.take(position, Math.min(1 << 20, end - position));
      if (chunk.length === 0) break;
      analyzer.push(chunk);
      position += chunk.length;
    }
    if (position < end)
      throw streamTruncated(parsed.info.dataBytes, position - parsed.info.dataOffset);
    await parsed.readTrailingChunks();
    return finalizeMeasurements(parsed.info, [analyzer.finish()], resolved);
  } finally {
    await source.close();
  }
}

export function streamTruncated(expectedBytes: number, gotBytes: number): AudioAnalysisError {
  return new AudioAnalysisError(
    'truncated',
    `The file is truncated: its header announces ${expectedBytes} bytes of audio but the stream ended after ${gotBytes}.`,
  );
}
