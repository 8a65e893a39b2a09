import { closeSync, openSync, readSync } from 'node:fs';
import type { ContainerInfo } from './container.ts';
import { AudioAnalysisError } from './errors.ts';
import {
  MICRO_BLOCKS_PER_SECOND,
  microBlockStartFrame,
  type ResolvedOptions,
  SegmentAnalyzer,
  type SegmentPlan,
  type SegmentResult,
} from './segment-analyzer.ts';

// One reused read buffer per segment: 1 MiB keeps the kernel's read-ahead busy without
// holding much memory (PERFORMANCE.md: a new buffer per chunk cost 0.3–0.5 s per file).
const READ_BUFFER_BYTES = 1 << 20;
// Filters settle long before this: the slowest pole (the 38 Hz high-pass) decays by e^-100
// within 0.5 s at any rate up to 192 kHz.
const PRE_ROLL_SECONDS = 0.5;
// Splitting a short file costs more in worker start-up than it saves.
export const MIN_SPLIT_SECONDS = 30;

/** Splits the file by time into `parts` segments on 10 ms boundaries, each with a pre-roll. */
export function planSegments(
  info: ContainerInfo,
  parts: number,
  options: ResolvedOptions,
): SegmentPlan[] {
  const { tags: _tags, container: _container, ...format } = info;
  const fs = info.sampleRateHz;
  const count = info.frames / fs < MIN_SPLIT_SECONDS ? 1 : Math.max(1, Math.floor(parts));
  const microBlocks = Math.ceil((info.frames * MICRO_BLOCKS_PER_SECOND) / fs);
  const boundaries = [0];
  for (let i = 1; i < count; i++) {
    boundaries.push(microBlockStartFrame(Math.round((microBlocks * i) / count), fs));
  }
  boundaries.push(info.frames);
  const plans: SegmentPlan[] = [];
  for (let i = 0; i < count; i++) {
    const startFrame = boundaries[i]!;
    plans.push({
      format,
      startFrame,
      endFrame: boundaries[i + 1]!,
      preRollFrames: Math.min(startFrame, Math.round(PRE_ROLL_SECONDS * fs)),
      options,
    });
  }
  return plans;
}

/** Bytes a segment reads, pre-roll included (for progress totals). */
export function countSegmentBytes(plan: SegmentPlan): number {
  return (plan.endFrame - plan.startFrame + plan.preRollFrames) * plan.format.blockAlign;
}

export interface SegmentReadHooks {
  /** Called with the bytes read since the previous call, every few MiB. */
  onBytes?: (bytes: number) => void;
  isCancelled?: () => boolean;
}

/** Reads one segment of a file with synchronous reads into one reused buffer and measures it. */
export function measureFileSegment(
  path: string,
  plan: SegmentPlan,
  hooks: SegmentReadHooks = {},
): SegmentResult {
  const analyzer = new SegmentAnalyzer(plan);
  const { blockAlign, dataOffset } = plan.format;
  const bufferBytes = Math.max(blockAlign, Math.floor(READ_BUFFER_BYTES / blockAlign) * blockAlign);
  const buffer = new Uint8Array(bufferBytes);
  let position = dataOffset + (plan.startFrame - plan.preRollFrames) * blockAlign;
  let remaining = countSegmentBytes(plan);
  let unreported = 0;
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (error) {
    throw new AudioAnalysisError(
      'read-failed',
      `Could not open ${path}: ${(error as Error).message}.`,
    );
  }
  try {
    while (remaining > 0) {
      if (hooks.isCancelled?.())
        throw new AudioAnalysisError('cancelled', 'The analysis was cancelled.');
      const want = Math.min(bufferBytes, remaining);
      const got = readSync(fd, buffer, 0, want, position);
      if (got === 0) {
        throw new AudioAnalysisError(
          'truncated',
          'The file ended before the end of its audio data (it changed while being read?).',
        );
      }
      analyzer.push(got === bufferBytes ? buffer : buffer.subarray(0, got));
      position += got;
      remaining -= got;
      unreported += got;
      if (unreported >= 4 * READ_BUFFER_BYTES) {
        hooks.onBytes?.(unreported);
        unreported = 0;
      }
    }
  } finally {
    closeSync(fd);
  }
  if (unreported > 0) hooks.onBytes?.(unreported);
  return analyzer.finish();
}
