import type { ContainerInfo } from './container.ts';
import { countEffectiveBits } from './decode.ts';
import {
  type CorrelationSums,
  MICRO_BLOCKS_PER_SECOND,
  microBlockStartFrame,
  type ResolvedOptions,
  type SegmentResult,
} from './segment-analyzer.ts';
import type { AudioMeasurements, ChannelMeasurement, ClippingSummary } from './types.ts';

/** Bump when a measurement changes meaning. */
export const ENGINE_VERSION = '1.0.0';

// BS.1770-4 eq. 2: L = −0.691 + 10·log10(Σ G_i·z_i).
const LOUDNESS_OFFSET_LU = -0.691;
// BS.1770-4 §2.8: absolute gate −70 LKFS; relative gate 10 LU below the absolutely gated level.
const ABSOLUTE_GATE_LUFS = -70;
const RELATIVE_GATE_LU = -10;
// EBU Tech 3342: relative gate 20 LU below, range = 95th − 10th percentile of short-term values.
const LRA_RELATIVE_GATE_LU = -20;
const LRA_LOW_PERCENTILE = 0.1;
const LRA_HIGH_PERCENTILE = 0.95;
// BS.1770-4 §2.8: gating blocks of 400 ms stepped by 100 ms (75 % overlap).
const MOMENTARY_MICRO_BLOCKS = 40;
const GATING_STEP_MICRO_BLOCKS = 10;
// EBU Tech 3341 §2: short-term loudness uses a 3 s window.
const SHORT_TERM_MICRO_BLOCKS = 300;
// Tech 3342 (2016) asks for consecutive short-term windows overlapping by at least 2.9 s,
// i.e. sampled at 10 Hz or faster (S2: IBC report on the 2016 EBU updates). We sample at
// exactly 10 Hz, the S update rate of Tech 3341, as ffmpeg's ebur128 filter does; libebur128
// samples at 1 Hz and reads lower on programmes with abrupt edges.
const LRA_STEP_MICRO_BLOCKS = 10;
// Red Book (IEC 60908): 75 sectors per second, 588 frames per sector at 44.1 kHz.
const CD_SECTORS_PER_SECOND = 75;
const MAX_SERIES_POINTS = 3000;
const SERIES_STEPS_SECONDS = [0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 30, 60];

function toLoudness(power: number): number {
  return LOUDNESS_OFFSET_LU + 10 * Math.log10(power);
}

function toDb(linear: number): number | null {
  return linear > 0 ? 20 * Math.log10(linear) : null;
}

/** Windowed powers over the concatenated micro-block sums. */
class LoudnessWindows {
  private readonly prefix: Float64Array;
  readonly microBlocks: number;

  constructor(
    sums: Float64Array,
    private readonly sampleRateHz: number,
    private readonly totalFrames: number,
  ) {
    this.microBlocks = sums.length;
    this.prefix = new Float64Array(sums.length + 1);
    for (let k = 0; k < sums.length; k++) this.prefix[k + 1] = this.prefix[k]! + sums[k]!;
  }

  /** Mean weighted power of micro-blocks [from, from+length), or null when the window runs past the end. */
  power(from: number, length: number): number | null {
    const endFrame = microBlockStartFrame(from + length, this.sampleRateHz);
    if (endFrame > this.totalFrames || from + length > this.microBlocks) return null;
    const frames = endFrame - microBlockStartFrame(from, this.sampleRateHz);
    return frames > 0
      ? Math.max(0, this.prefix[from + length]! - this.prefix[from]!) / frames
      : null;
  }

  /** Mean power over micro-blocks [from, to), allowing a short window at the start. */
  partialPower(from: number, to: number): number {
    const start = microBlockStartFrame(from, this.sampleRateHz);
    const end = Math.min(this.totalFrames, microBlockStartFrame(to, this.sampleRateHz));
    const upto = Math.min(to, this.microBlocks);
    return end > start ? Math.max(0, this.prefix[upto]! - this.prefix[from]!) / (end - start) : 0;
  }

  collect(length: number, step: number): number[] {
    const powers: number[] = [];
    for (let from = 0; ; from += step) {
      const p = this.power(from, length);
      if (p === null) break;
      powers.push(p);
    }
    return powers;
  }
}

export function computeIntegratedLoudness(blockPowers: number[]): number | null {
  const absolute = blockPowers.filter((p) => p > 0 && toLoudness(p) > ABSOLUTE_GATE_LUFS);
  if (absolute.length === 0) return null;
  const mean = absolute.reduce((a, b) => a + b, 0) / absolute.length;
  const relativeGate = toLoudness(mean) + RELATIVE_GATE_LU;
  const gated = absolute.filter((p) => toLoudness(p) > relativeGate);
  if (gated.length === 0) return null;
  return toLoudness(gated.reduce((a, b) => a + b, 0) / gated.length);
}

export function computeLoudnessRange(shortTermPowers: number[]): number | null {
  const absolute = shortTermPowers.filter((p) => p > 0 && toLoudness(p) > ABSOLUTE_GATE_LUFS);
  if (absolute.length === 0) return null;
  const mean = absolute.reduce((a, b) => a + b, 0) / absolute.length;
  const relativeGate = toLoudness(mean) + LRA_RELATIVE_GATE_LU;
  const levels = absolute
    .map(toLoudness)
    .filter((l) => l > relativeGate)
    .sort((a, b) => a - b);
  if (levels.length === 0) return null;
  // Nearest-rank percentiles as libebur128 computes them (index = (n − 1)·p rounded; from memory).
  const low = levels[Math.round((levels.length - 1) * LRA_LOW_PERCENTILE)]!;
  const high = levels[Math.round((levels.length - 1) * LRA_HIGH_PERCENTILE)]!;
  return high - low;
}

function findMaxLoudness(powers: number[]): number | null {
  let best = 0;
  for (const p of powers) if (p > best) best = p;
  return best > 0 ? toLoudness(best) : null;
}

function mergeClipping(
  segments: SegmentResult[],
  channel: number,
  minRun: number,
  fs: number,
): ClippingSummary {
  let count = 0;
  let longest = 0;
  const runs: { atSeconds: number; lengthSamples: number }[] = [];
  const close = (start: number, length: number): void => {
    if (length < minRun) return;
    count++;
    if (length > longest) longest = length;
    if (runs.length < 50) runs.push({ atSeconds: start / fs, lengthSamples: length });
  };
  let carry: { start: number; length: number } | null = null;
  for (const segment of segments) {
    const clip = segment.channels[channel]!.clipping;
    if (clip.leadingRun > 0) {
      if (carry) carry.length += clip.leadingRun;
      else carry = { start: segment.startFrame, length: clip.leadingRun };
      if (clip.allClipped) continue;
      close(carry.start, carry.length);
      carry = null;
    } else if (carry) {
      close(carry.start, carry.length);
      carry = null;
    }
    count += clip.count;
    longest = Math.max(longest, clip.longest);
    for (const run of clip.runs) {
      if (runs.length < 50)
        runs.push({ atSeconds: run.startFrame / fs, lengthSamples: run.lengthSamples });
    }
    if (clip.trailingRun > 0) carry = { start: clip.trailingRunStart, length: clip.trailingRun };
  }
  if (carry) close(carry.start, carry.length);
  runs.sort((a, b) => a.atSeconds - b.atSeconds);
  return { runCount: count, longestRunSamples: longest, minRunSamples: minRun, runs };
}

function computePearson(
  n: number,
  sx: number,
  sy: number,
  sxx: number,
  syy: number,
  sxy: number,
): number | null {
  if (n < 2) return null;
  const vx = n * sxx - sx * sx;
  const vy = n * syy - sy * sy;
  if (!(vx > 0 && vy > 0)) return null;
  const r = (n * sxy - sx * sy) / Math.sqrt(vx * vy);
  return Math.max(-1, Math.min(1, r));
}

function addCorrelation(a: CorrelationSums, b: CorrelationSums): CorrelationSums {
  return {
    n: a.n + b.n,
    sl: a.sl + b.sl,
    sr: a.sr + b.sr,
    sll: a.sll + b.sll,
    srr: a.srr + b.srr,
    slr: a.slr + b.slr,
    ql: a.ql + b.ql,
    qr: a.qr + b.qr,
    qll: a.qll + b.qll,
    qrr: a.qrr + b.qrr,
    qlr: a.qlr + b.qlr,
    identical: a.identical && b.identical,
    inverted: a.inverted && b.inverted,
  };
}

function round(value: number, places: number): number {
  const f = 10 ** places;
  return Math.round(value * f) / f;
}

/** Combines the segments of one file (in any order) into the published result. */
export function finalizeMeasurements(
  info: ContainerInfo,
  unordered: SegmentResult[],
  options: ResolvedOptions,
): AudioMeasurements {
  const segments = [...unordered].sort((a, b) => a.startFrame - b.startFrame);
  const fs = info.sampleRateHz;
  const total = info.frames;
  const channelCount = info.channels;

  // Loudness from the concatenated micro-block sums.
  const microLength = segments.reduce((n, s) => n + s.microBlockSums.length, 0);
  const sums = new Float64Array(microLength);
  let at = 0;
  for (const s of segments) {
    sums.set(s.microBlockSums, at);
    at += s.microBlockSums.length;
  }
  const windows = new LoudnessWindows(sums, fs, total);
  const gatingBlocks = windows.collect(MOMENTARY_MICRO_BLOCKS, GATING_STEP_MICRO_BLOCKS);
  const momentary = windows.collect(MOMENTARY_MICRO_BLOCKS, 1);
  const shortTermAll = windows.collect(SHORT_TERM_MICRO_BLOCKS, 1);
  const shortTermLra = windows.collect(SHORT_TERM_MICRO_BLOCKS, LRA_STEP_MICRO_BLOCKS);

  const durationSeconds = total / fs;
  const stepSeconds =
    SERIES_STEPS_SECONDS.find((s) => durationSeconds / s <= MAX_SERIES_POINTS) ??
    Math.ceil(durationSeconds / MAX_SERIES_POINTS);
  const stepMicro = Math.round(stepSeconds * MICRO_BLOCKS_PER_SECOND);
  const shortTermSeries: (number | null)[] = [];
  for (let end = stepMicro; end <= windows.microBlocks; end += stepMicro) {
    const p = windows.partialPower(Math.max(0, end - SHORT_TERM_MICRO_BLOCKS), end);
    shortTermSeries.push(
      p > 0 && toLoudness(p) > ABSOLUTE_GATE_LUFS ? round(toLoudness(p), 2) : null,
    );
  }

  // Per channel.
  const channels: ChannelMeasurement[] = [];
  let loudestTruePeak = 0;
  let loudestTruePeakAt: number | null = null;
  let loudestSamplePeak = 0;
  for (let c = 0; c < channelCount; c++) {
    let min = Infinity;
    let max = -Infinity;
    let sum = 0;
    let orBits = 0;
    let offGrid = false;
    let truePeak = 0;
    let truePeakAtFrame = -1;
    for (const s of segments) {
      const r = s.channels[c]!;
      min = Math.min(min, r.min);
      max = Math.max(max, r.max);
      sum += r.sum;
      orBits |= r.orBits;
      offGrid ||= r.offGrid;
      if (r.truePeak > truePeak) {
        truePeak = r.truePeak;
        truePeakAtFrame = r.truePeakAtFrame;
      }
    }
    const samplePeak = total > 0 ? Math.max(Math.abs(min), Math.abs(max)) : 0;
    // A true-peak reading never goes below the sample peak (libebur128 does the same).
    const channelTruePeak = Math.max(truePeak, samplePeak);
    const first = segments[0]?.channels[c]?.firstSample ?? 0;
    const last = segments[segments.length - 1]?.channels[c]?.lastSample ?? 0;
    const effectiveBitDepth =
      info.encoding === 'pcm-float'
        ? offGrid
          ? info.bitsPerSample
          : countEffectiveBits(orBits, 24)
        : countEffectiveBits(orBits, info.bitsPerSample);
    const truePeakAtSeconds =
      channelTruePeak > 0 && truePeakAtFrame >= 0 ? truePeakAtFrame / fs : null;
    channels.push({
      samplePeakDbfs: toDb(samplePeak),
      truePeakDbtp: toDb(channelTruePeak),
      truePeakAtSeconds,
      dcOffset: total > 0 ? sum / total : 0,
      clipping: mergeClipping(segments, c, options.clipMinRunSamples, fs),
      firstSampleDbfs: total > 0 ? toDb(Math.abs(first)) : null,
      lastSampleDbfs: total > 0 ? toDb(Math.abs(last)) : null,
      effectiveBitDepth,
    });
    if (channelTruePeak > loudestTruePeak) {
      loudestTruePeak = channelTruePeak;
      loudestTruePeakAt = truePeakAtSeconds;
    }
    loudestSamplePeak = Math.max(loudestSamplePeak, samplePeak);
  }

  // Silence at the head and tail.
  let firstLoud = -1;
  let lastLoud = -1;
  for (const s of segments) {
    if (firstLoud < 0 && s.firstLoudFrame >= 0) firstLoud = s.firstLoudFrame;
    if (s.lastLoudFrame >= 0) lastLoud = s.lastLoudFrame;
  }

  // Correlation of the first two channels.
  let correlationSums: CorrelationSums | null = null;
  for (const s of segments) {
    if (s.correlation)
      correlationSums = correlationSums
        ? addCorrelation(correlationSums, s.correlation)
        : s.correlation;
  }
  const cs = correlationSums;
  const identical = cs !== null && total > 0 && cs.identical;

  // Waveform overview.
  const pointFrames = Math.max(1, Math.ceil(total / options.waveformPoints));
  const bins = total > 0 ? Math.ceil(total / pointFrames) : 0;
  const waveMin = new Array<number>(bins).fill(0);
  const waveMax = new Array<number>(bins).fill(0);
  const filled = new Uint8Array(bins);
  for (const s of segments) {
    for (let b = 0; b < s.waveform.min.length; b++) {
      const bin = s.waveform.firstBin + b;
      if (bin >= bins) break;
      const lo = s.waveform.min[b]!;
      const hi = s.waveform.max[b]!;
      if (!Number.isFinite(lo) || !Number.isFinite(hi)) continue;
      if (!filled[bin] || lo < waveMin[bin]!) waveMin[bin] = lo;
      if (!filled[bin] || hi > waveMax[bin]!) waveMax[bin] = hi;
      filled[bin] = 1;
    }
  }
  const cdFrameCount = Math.floor((total * CD_SECTORS_PER_SECOND) / fs);

  return {
    engineVersion: ENGINE_VERSION,
    format: {
      container: info.container,
      encoding: info.encoding,
      sampleRateHz: fs,
      channels: channelCount,
      bitsPerSample: info.bitsPerSample,
      durationSamples: total,
      durationSeconds,
      dataBytes: info.dataBytes,
    },
    tags: info.tags,
    loudness: {
      integratedLufs: computeIntegratedLoudness(gatingBlocks),
      rangeLu: computeLoudnessRange(shortTermLra),
      maxMomentaryLufs: findMaxLoudness(momentary),
      maxShortTermLufs: findMaxLoudness(shortTermAll),
      truePeakDbtp: toDb(loudestTruePeak),
      truePeakAtSeconds: loudestTruePeakAt,
      samplePeakDbfs: toDb(loudestSamplePeak),
    },
    channels,
    silence: {
      thresholdDbfs: options.silenceThresholdDbfs,
      headSeconds: firstLoud < 0 ? durationSeconds : firstLoud / fs,
      tailSeconds: lastLoud < 0 ? durationSeconds : (total - 1 - lastLoud) / fs,
    },
    correlation: {
      fullBand: cs ? computePearson(cs.n, cs.sl, cs.sr, cs.sll, cs.srr, cs.slr) : null,
      lowBand: cs ? computePearson(cs.n, cs.ql, cs.qr, cs.qll, cs.qrr, cs.qlr) : null,
      lowBandHz: options.lowBandHz,
      identicalChannels: identical,
      // All-zero channels are identical, not inverted.
      invertedChannels: cs !== null && total > 0 && cs.inverted && !identical,
    },
    cdFrames: {
      frames: cdFrameCount,
      remainderSamples: Math.round(total - (cdFrameCount * fs) / CD_SECTORS_PER_SECOND),
    },
    series: {
      loudness: { stepSeconds, shortTermLufs: shortTermSeries },
      waveform: {
        pointSeconds: pointFrames / fs,
        min: waveMin.map((v) => round(v, 5)),
        max: waveMax.map((v) => round(v, 5)),
      },
    },
  };
}
