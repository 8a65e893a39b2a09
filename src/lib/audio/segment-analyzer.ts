import type { ContainerInfo } from './container.ts';
import { type DecodeStats, decodeChannel } from './decode.ts';
import {
  type Biquad,
  computeHighPassCoefficients,
  computeLowPassCoefficients,
  computeShelfCoefficients,
} from './k-weighting.ts';
import {
  chooseOversamplingFactor,
  scanTruePeak2x,
  scanTruePeak4x,
  TRUE_PEAK_DELAY_SAMPLES,
  TRUE_PEAK_TAPS,
  type TruePeakScan,
} from './true-peak.ts';
import { SimdTruePeak } from './true-peak-simd.ts';

/** Settings a caller may change; every one has a documented default. */
export interface AnalysisOptions {
  /** Level below which a sample is silent, dBFS. Default −60 (common practice for head/tail checks). */
  silenceThresholdDbfs?: number;
  /** Consecutive full-scale samples that count as a clipped run. Default 3 (common practice). */
  clipMinRunSamples?: number;
  /** Corner of the low-band correlation filter, Hz. Default 150 (REFERENCES §9: keep bass mono below 150–300 Hz). */
  lowBandHz?: number;
  /** Points in the waveform overview. Default 2000. */
  waveformPoints?: number;
  /** Use the WebAssembly SIMD true-peak kernel when the runtime has it. Default true. */
  useSimd?: boolean;
}

export type ResolvedOptions = Required<AnalysisOptions>;

export function resolveOptions(options: AnalysisOptions = {}): ResolvedOptions {
  return {
    silenceThresholdDbfs: options.silenceThresholdDbfs ?? -60,
    clipMinRunSamples: Math.max(1, Math.floor(options.clipMinRunSamples ?? 3)),
    lowBandHz: options.lowBandHz ?? 150,
    waveformPoints: Math.max(1, Math.floor(options.waveformPoints ?? 2000)),
    useSimd: options.useSimd ?? true,
  };
}

/** The part of ContainerInfo a worker needs (no tags). */
export type DecodeFormat = Omit<ContainerInfo, 'tags' | 'container'>;

/** One contiguous time range of the file, analysed on its own and merged afterwards. */
export interface SegmentPlan {
  format: DecodeFormat;
  startFrame: number;
  endFrame: number;
  /** Frames before startFrame decoded only to settle the filters. */
  preRollFrames: number;
  options: ResolvedOptions;
}

/** Loudness is accumulated in 10 ms micro-blocks; 400 ms and 3 s windows are sums of them. */
export const MICRO_BLOCKS_PER_SECOND = 100;

/** First frame of micro-block k (boundaries rounded so any sample rate works). */
export function microBlockStartFrame(k: number, sampleRateHz: number): number {
  return Math.round((k * sampleRateHz) / MICRO_BLOCKS_PER_SECOND);
}

/** Index of the micro-block containing `frame`. */
export function microBlockIndexAt(frame: number, sampleRateHz: number): number {
  let k = Math.floor((frame * MICRO_BLOCKS_PER_SECOND) / sampleRateHz);
  while (microBlockStartFrame(k + 1, sampleRateHz) <= frame) k++;
  while (k > 0 && microBlockStartFrame(k, sampleRateHz) > frame) k--;
  return k;
}

export interface ClipEdgeSummary {
  /** Length of the run that starts at the segment's first frame (0 when none). */
  leadingRun: number;
  /** Run still open at the segment's last frame: where it started and its length. */
  trailingRunStart: number;
  trailingRun: number;
  /** The whole segment is one run. */
  allClipped: boolean;
  /** Runs that touch neither edge, already filtered by minimum length. */
  count: number;
  longest: number;
  runs: { startFrame: number; lengthSamples: number }[];
}

export interface ChannelSegmentResult {
  min: number;
  max: number;
  sum: number;
  orBits: number;
  offGrid: boolean;
  truePeak: number;
  truePeakAtFrame: number;
  clipping: ClipEdgeSummary;
  firstSample: number;
  lastSample: number;
}

export interface CorrelationSums {
  n: number;
  sl: number;
  sr: number;
  sll: number;
  srr: number;
  slr: number;
  ql: number;
  qr: number;
  qll: number;
  qrr: number;
  qlr: number;
  identical: boolean;
  inverted: boolean;
}

export interface SegmentResult {
  startFrame: number;
  endFrame: number;
  firstMicroBlock: number;
  /** Channel-weighted sums of K-weighted squares per 10 ms micro-block. */
  microBlockSums: Float64Array;
  channels: ChannelSegmentResult[];
  firstLoudFrame: number;
  lastLoudFrame: number;
  waveform: { firstBin: number; min: Float32Array; max: Float32Array };
  correlation: CorrelationSums | null;
}

/** Samples of history kept in front of each block (the true-peak FIR needs 11). */
export const HISTORY_FRAMES = 16;
const BLOCK_FRAMES = 16_384;
/** The first output of the true-peak FIR that sees only real samples. */
const TRUE_PEAK_SETTLE_FRAMES = TRUE_PEAK_TAPS - 1;
const MAX_LISTED_RUNS = 50;

/**
 * BS.1770-4 channel weights G_i: 1.0 for front channels, 1.41 for surrounds, 0 for LFE.
 * Speakers come from the WAVE_FORMAT_EXTENSIBLE mask when there is one; without it, 5 channels
 * are read as L R C Ls Rs and 6 as L R C LFE Ls Rs (the usual WAV order, common practice).
 */
export function computeChannelWeights(channels: number, channelMask: number | null): Float64Array {
  const weights = new Float64Array(channels).fill(1);
  if (channelMask !== null && channelMask !== 0) {
    // Speaker bits of the channel mask (Microsoft ksmedia.h): LFE 0x8; back L/R 0x10/0x20;
    // side L/R 0x200/0x400.
    let c = 0;
    for (let bit = 0; bit < 32 && c < channels; bit++) {
      const speaker = 1 << bit;
      if ((channelMask & speaker) === 0) continue;
      if (speaker === 0x8) weights[c] = 0;
      else if (speaker === 0x10 || speaker === 0x20 || speaker === 0x200 || speaker === 0x400)
        weights[c] = 1.41; // BS.1770-4 Table 3
      c++;
    }
    return weights;
  }
  if (channels === 5) {
    weights[3] = 1.41; // BS.1770-4 Table 3 (surround)
    weights[4] = 1.41;
  } else if (channels === 6) {
    weights[3] = 0; // LFE is excluded, BS.1770-4 §2
    weights[4] = 1.41;
    weights[5] = 1.41;
  }
  return weights;
}

function packBiquads(shelf: Biquad, highPass: Biquad): Float64Array {
  return new Float64Array([
    shelf.b0,
    shelf.b1,
    shelf.b2,
    shelf.a1,
    shelf.a2,
    highPass.a1,
    highPass.a2,
  ]);
}

/**
 * Runs the two K-weighting stages over x[from..to) and returns the sum of squared output.
 * State layout: x1, x2, (stage-1 output) m1, m2, (stage-2 output) y1, y2.
 */
function filterKWeightedSquares(
  x: Float32Array,
  from: number,
  to: number,
  state: Float64Array,
  c: Float64Array,
): number {
  const b0 = c[0]!,
    b1 = c[1]!,
    b2 = c[2]!,
    a1 = c[3]!,
    a2 = c[4]!,
    h1 = c[5]!,
    h2 = c[6]!;
  let x1 = state[0]!,
    x2 = state[1]!,
    m1 = state[2]!,
    m2 = state[3]!,
    y1 = state[4]!,
    y2 = state[5]!;
  let sum = 0;
  for (let i = from; i < to; i++) {
    const x0 = x[i]!;
    const m0 = b0 * x0 + b1 * x1 + b2 * x2 - a1 * m1 - a2 * m2;
    // Stage 2 numerator is [1, −2, 1] (BS.1770-4 Table 2).
    const y0 = m0 - 2 * m1 + m2 - h1 * y1 - h2 * y2;
    sum += y0 * y0;
    x2 = x1;
    x1 = x0;
    m2 = m1;
    m1 = m0;
    y2 = y1;
    y1 = y0;
  }
  state[0] = x1;
  state[1] = x2;
  state[2] = m1;
  state[3] = m2;
  state[4] = y1;
  state[5] = y2;
  return sum;
}

/** Min, max and sum of x[from..to) into out[0..2]. */
function measureRange(x: Float32Array, from: number, to: number, out: Float64Array): void {
  let mn = out[0]!;
  let mx = out[1]!;
  let sum = 0;
  for (let i = from; i < to; i++) {
    const v = x[i]!;
    if (v > mx) mx = v;
    if (v < mn) mn = v;
    sum += v;
  }
  out[0] = mn;
  out[1] = mx;
  out[2] = out[2]! + sum;
}

/**
 * Correlation sums of two channels, full band and after a low-pass; `acc` is CorrelationSums
 * in array form (see CORRELATION_FIELDS), `state` the two low-pass filters' x1 x2 y1 y2.
 */
function accumulateCorrelation(
  l: Float32Array,
  r: Float32Array,
  from: number,
  to: number,
  c: Float64Array,
  state: Float64Array,
  acc: Float64Array,
): void {
  const b0 = c[0]!,
    b1 = c[1]!,
    b2 = c[2]!,
    a1 = c[3]!,
    a2 = c[4]!;
  let lx1 = state[0]!,
    lx2 = state[1]!,
    ly1 = state[2]!,
    ly2 = state[3]!;
  let rx1 = state[4]!,
    rx2 = state[5]!,
    ry1 = state[6]!,
    ry2 = state[7]!;
  let sl = 0,
    sr = 0,
    sll = 0,
    srr = 0,
    slr = 0;
  let ql = 0,
    qr = 0,
    qll = 0,
    qrr = 0,
    qlr = 0;
  let notIdentical = 0,
    notInverted = 0;
  for (let i = from; i < to; i++) {
    const lv = l[i]!;
    const rv = r[i]!;
    sl += lv;
    sr += rv;
    sll += lv * lv;
    srr += rv * rv;
    slr += lv * rv;
    notIdentical += lv !== rv ? 1 : 0;
    notInverted += lv !== -rv ? 1 : 0;
    const ly = b0 * lv + b1 * lx1 + b2 * lx2 - a1 * ly1 - a2 * ly2;
    const ry = b0 * rv + b1 * rx1 + b2 * rx2 - a1 * ry1 - a2 * ry2;
    lx2 = lx1;
    lx1 = lv;
    ly2 = ly1;
    ly1 = ly;
    rx2 = rx1;
    rx1 = rv;
    ry2 = ry1;
    ry1 = ry;
    ql += ly;
    qr += ry;
    qll += ly * ly;
    qrr += ry * ry;
    qlr += ly * ry;
  }
  state[0] = lx1;
  state[1] = lx2;
  state[2] = ly1;
  state[3] = ly2;
  state[4] = rx1;
  state[5] = rx2;
  state[6] = ry1;
  state[7] = ry2;
  acc[0] = acc[0]! + to - from;
  acc[1] = acc[1]! + sl;
  acc[2] = acc[2]! + sr;
  acc[3] = acc[3]! + sll;
  acc[4] = acc[4]! + srr;
  acc[5] = acc[5]! + slr;
  acc[6] = acc[6]! + ql;
  acc[7] = acc[7]! + qr;
  acc[8] = acc[8]! + qll;
  acc[9] = acc[9]! + qrr;
  acc[10] = acc[10]! + qlr;
  acc[11] = acc[11]! + notIdentical;
  acc[12] = acc[12]! + notInverted;
}

function scanSamplePeak(
  x: Float32Array,
  from: number,
  to: number,
  floor: number,
  out: TruePeakScan,
): void {
  let best = floor;
  let bestAt = -1;
  for (let i = from; i < to; i++) {
    const a = Math.abs(x[i]!);
    if (a > best) {
      best = a;
      bestAt = i;
    }
  }
  out.peak = best;
  out.atIndex = bestAt;
}

class ClipTracker {
  private runStart = -1;
  private runLength = 0;
  leadingRun = 0;
  count = 0;
  longest = 0;
  readonly runs: { startFrame: number; lengthSamples: number }[] = [];

  constructor(
    private readonly segmentStart: number,
    private readonly minRun: number,
  ) {}

  /** Scans x[from..to) whose first element is frame `frameAt`. */
  scan(x: Float32Array, from: number, to: number, frameAt: number, threshold: number): void {
    let runLength = this.runLength;
    let runStart = this.runStart;
    for (let i = from; i < to; i++) {
      if (Math.abs(x[i]!) >= threshold) {
        if (runLength === 0) runStart = frameAt + (i - from);
        runLength++;
      } else if (runLength > 0) {
        this.close(runStart, runLength);
        runLength = 0;
      }
    }
    this.runLength = runLength;
    this.runStart = runStart;
  }

  /** The block had no sample at the threshold: an open run ends before it. */
  breakRun(): void {
    if (this.runLength > 0) this.close(this.runStart, this.runLength);
    this.runLength = 0;
  }

  private close(start: number, length: number): void {
    if (start === this.segmentStart) {
      this.leadingRun = length;
      return;
    }
    if (length < this.minRun) return;
    this.count++;
    if (length > this.longest) this.longest = length;
    if (this.runs.length < MAX_LISTED_RUNS)
      this.runs.push({ startFrame: start, lengthSamples: length });
  }

  summarise(): ClipEdgeSummary {
    const open = this.runLength > 0;
    const allClipped = open && this.runStart === this.segmentStart;
    return {
      leadingRun: allClipped ? this.runLength : this.leadingRun,
      trailingRunStart: open ? this.runStart : -1,
      trailingRun: open ? this.runLength : 0,
      allClipped,
      count: this.count,
      longest: this.longest,
      runs: this.runs,
    };
  }
}

/** Full scale minus one LSB for integer codes; just under 1.0 for float (one 24-bit step). */
export function computeClipThreshold(format: DecodeFormat): number {
  if (format.encoding === 'pcm-float') return 1 - 2 ** -23;
  return 1 - 2 ** (2 - format.bitsPerSample);
}

/**
 * Measures one segment of interleaved PCM pushed in order, starting `preRollFrames` before
 * `startFrame`. Memory is fixed: one block per channel plus 8 bytes per 10 ms of loudness.
 */
export class SegmentAnalyzer {
  private readonly format: DecodeFormat;
  private readonly plan: SegmentPlan;
  private readonly channelCount: number;
  private readonly samples: Float32Array[];
  private readonly simd: SimdTruePeak | null;
  private readonly decodeStats: DecodeStats[];
  private readonly kState: Float64Array[];
  private readonly kCoefficients: Float64Array;
  private readonly weights: Float64Array;
  private readonly lowPass: Float64Array;
  private readonly lowPassState = new Float64Array(8);
  private readonly correlationAcc = new Float64Array(13);
  private readonly scratchAcc = new Float64Array(13);
  private readonly stats: Float64Array[];
  private readonly rangeScratch = new Float64Array(3);
  private readonly clip: ClipTracker[];
  private readonly clipThreshold: number;
  private readonly silenceThreshold: number;
  private readonly oversampling: 1 | 2 | 4;
  private readonly truePeak: Float64Array;
  private readonly truePeakAt: Float64Array;
  private readonly scan: TruePeakScan = { peak: 0, atIndex: -1 };
  private readonly firstSamples: Float64Array;
  private readonly lastSamples: Float64Array;
  private readonly microSums: Float64Array;
  private readonly firstMicroBlock: number;
  private microCount = 0;
  private microAccumulator = 0;
  private nextBoundary: number;
  private readonly waveformPointFrames: number;
  private readonly waveformFirstBin: number;
  private readonly waveformMin: Float32Array;
  private readonly waveformMax: Float32Array;
  private firstLoudFrame = -1;
  private lastLoudFrame = -1;
  /** Absolute frame index of the next frame to arrive. */
  private cursor: number;
  private carry: Uint8Array;
  private carryLength = 0;
  /** Frames decoded into the current block and not yet measured. */
  private filled = 0;

  constructor(plan: SegmentPlan) {
    const { format } = plan;
    this.plan = plan;
    this.format = format;
    const channels = format.channels;
    this.channelCount = channels;
    this.cursor = plan.startFrame - plan.preRollFrames;
    this.oversampling = chooseOversamplingFactor(format.sampleRateHz);
    this.simd =
      this.oversampling > 1 && plan.options.useSimd
        ? SimdTruePeak.create(channels, HISTORY_FRAMES + BLOCK_FRAMES)
        : null;
    this.samples =
      this.simd?.samples ??
      Array.from({ length: channels }, () => new Float32Array(HISTORY_FRAMES + BLOCK_FRAMES));
    this.decodeStats = Array.from({ length: channels }, () => ({ orBits: 0, offGrid: false }));
    this.kState = Array.from({ length: channels }, () => new Float64Array(6));
    this.kCoefficients = packBiquads(
      computeShelfCoefficients(format.sampleRateHz),
      computeHighPassCoefficients(format.sampleRateHz),
    );
    const lp = computeLowPassCoefficients(format.sampleRateHz, plan.options.lowBandHz);
    this.lowPass = new Float64Array([lp.b0, lp.b1, lp.b2, lp.a1, lp.a2]);
    this.weights = computeChannelWeights(channels, format.channelMask);
    this.stats = Array.from({ length: channels }, () => new Float64Array([Infinity, -Infinity, 0]));
    this.clip = Array.from(
      { length: channels },
      () => new ClipTracker(plan.startFrame, plan.options.clipMinRunSamples),
    );
    this.clipThreshold = computeClipThreshold(format);
    this.silenceThreshold = 10 ** (plan.options.silenceThresholdDbfs / 20);
    this.truePeak = new Float64Array(channels);
    this.truePeakAt = new Float64Array(channels).fill(-1);
    this.firstSamples = new Float64Array(channels);
    this.lastSamples = new Float64Array(channels);
    const fs = format.sampleRateHz;
    this.firstMicroBlock = microBlockIndexAt(plan.startFrame, fs);
    const lastMicroBlock =
      plan.endFrame > plan.startFrame
        ? microBlockIndexAt(plan.endFrame - 1, fs)
        : this.firstMicroBlock - 1;
    this.microSums = new Float64Array(Math.max(0, lastMicroBlock - this.firstMicroBlock + 1));
    this.nextBoundary = microBlockStartFrame(this.firstMicroBlock + 1, fs);
    const total = format.frames;
    this.waveformPointFrames = Math.max(1, Math.ceil(total / plan.options.waveformPoints));
    this.waveformFirstBin = Math.floor(plan.startFrame / this.waveformPointFrames);
    const lastBin =
      plan.endFrame > plan.startFrame
        ? Math.floor((plan.endFrame - 1) / this.waveformPointFrames)
        : this.waveformFirstBin - 1;
    const bins = Math.max(0, lastBin - this.waveformFirstBin + 1);
    this.waveformMin = new Float32Array(bins).fill(Infinity);
    this.waveformMax = new Float32Array(bins).fill(-Infinity);
    this.carry = new Uint8Array(format.blockAlign);
  }

  /** Frames still expected (pre-roll included). */
  get remainingFrames(): number {
    return this.plan.endFrame - this.cursor - this.filled;
  }

  /** Accepts the next interleaved bytes (any length; a partial frame is kept for the next call). */
  push(bytes: Uint8Array): void {
    const blockAlign = this.format.blockAlign;
    let input = bytes;
    if (this.carryLength > 0) {
      const need = blockAlign - this.carryLength;
      if (input.length < need) {
        this.carry.set(input, this.carryLength);
        this.carryLength += input.length;
        return;
      }
      this.carry.set(input.subarray(0, need), this.carryLength);
      this.carryLength = 0;
      if (this.remainingFrames > 0) this.decodeFrames(this.carry, 0, 1);
      input = input.subarray(need);
    }
    const whole = Math.min(
      Math.floor(input.length / blockAlign),
      Math.max(0, this.remainingFrames),
    );
    let done = 0;
    while (done < whole) {
      const frames = Math.min(BLOCK_FRAMES - this.filled, whole - done);
      this.decodeFrames(input, done * blockAlign, frames);
      done += frames;
    }
    const rest = input.length - whole * blockAlign;
    if (rest > 0 && this.remainingFrames > 0) {
      const keep = Math.min(rest, blockAlign - 1);
      this.carry.set(input.subarray(whole * blockAlign, whole * blockAlign + keep), 0);
      this.carryLength = keep;
    }
  }

  /**
   * Decodes into the block being filled; a block is measured once full, so results do not
   * depend on how the input was chunked.
   */
  private decodeFrames(bytes: Uint8Array, byteAt: number, frames: number): void {
    const f = this.format;
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    for (let c = 0; c < this.channelCount; c++) {
      decodeChannel(
        f.coding,
        bytes,
        view,
        byteAt,
        frames,
        f.blockAlign,
        c,
        f.bytesPerSample,
        this.samples[c]!,
        HISTORY_FRAMES + this.filled,
        this.decodeStats[c]!,
      );
    }
    this.filled += frames;
    if (this.filled === BLOCK_FRAMES) {
      this.filled = 0;
      this.processBlock(BLOCK_FRAMES);
    }
  }

  private processBlock(frames: number): void {
    const blockStart = this.cursor;
    const ownStart = Math.max(blockStart, this.plan.startFrame);
    const split = HISTORY_FRAMES + (ownStart - blockStart);
    const end = HISTORY_FRAMES + frames;
    if (split > HISTORY_FRAMES) this.warmFilters(HISTORY_FRAMES, Math.min(split, end));
    if (split < end) this.measure(split, end, ownStart);
    for (const x of this.samples) x.copyWithin(0, frames, frames + HISTORY_FRAMES);
    this.cursor += frames;
  }

  /** Pre-roll: settle the IIR filters' state without counting anything. */
  private warmFilters(from: number, to: number): void {
    for (let c = 0; c < this.channelCount; c++) {
      filterKWeightedSquares(this.samples[c]!, from, to, this.kState[c]!, this.kCoefficients);
    }
    if (this.channelCount >= 2) {
      accumulateCorrelation(
        this.samples[0]!,
        this.samples[1]!,
        from,
        to,
        this.lowPass,
        this.lowPassState,
        this.scratchAcc,
      );
    }
  }

  private measure(from: number, to: number, frameAt: number): void {
    const channels = this.channelCount;
    const fs = this.format.sampleRateHz;
    // Loudness, in micro-block pieces.
    let i = from;
    let frame = frameAt;
    while (i < to) {
      const pieceEnd = Math.min(to, i + (this.nextBoundary - frame));
      let weighted = 0;
      for (let c = 0; c < channels; c++) {
        const g = this.weights[c]!;
        const sum = filterKWeightedSquares(
          this.samples[c]!,
          i,
          pieceEnd,
          this.kState[c]!,
          this.kCoefficients,
        );
        weighted += g * sum;
      }
      this.microAccumulator += weighted;
      frame += pieceEnd - i;
      i = pieceEnd;
      if (frame === this.nextBoundary) {
        this.microSums[this.microCount++] = this.microAccumulator;
        this.microAccumulator = 0;
        this.nextBoundary = microBlockStartFrame(this.firstMicroBlock + this.microCount + 1, fs);
      }
    }
    if (frameAt === this.plan.startFrame) {
      for (let c = 0; c < channels; c++) this.firstSamples[c] = this.samples[c]![from]!;
    }
    const blockMin = new Float64Array(channels);
    const blockMax = new Float64Array(channels);
    // Level statistics and the waveform overview, in waveform-bin pieces.
    const pointFrames = this.waveformPointFrames;
    const range = this.rangeScratch;
    for (let c = 0; c < channels; c++) {
      const x = this.samples[c]!;
      let bmin = Infinity;
      let bmax = -Infinity;
      let sum = 0;
      let j = from;
      let fr = frameAt;
      while (j < to) {
        const bin = Math.floor(fr / pointFrames);
        const pieceEnd = Math.min(to, j + ((bin + 1) * pointFrames - fr));
        range[0] = Infinity;
        range[1] = -Infinity;
        range[2] = 0;
        measureRange(x, j, pieceEnd, range);
        const local = bin - this.waveformFirstBin;
        if (range[0]! < this.waveformMin[local]!) this.waveformMin[local] = range[0]!;
        if (range[1]! > this.waveformMax[local]!) this.waveformMax[local] = range[1]!;
        if (range[0]! < bmin) bmin = range[0]!;
        if (range[1]! > bmax) bmax = range[1]!;
        sum += range[2]!;
        fr += pieceEnd - j;
        j = pieceEnd;
      }
      const s = this.stats[c]!;
      if (bmin < s[0]!) s[0] = bmin;
      if (bmax > s[1]!) s[1] = bmax;
      s[2] = s[2]! + sum;
      blockMin[c] = bmin;
      blockMax[c] = bmax;
      this.lastSamples[c] = x[to - 1]!;
      // Clipped runs: only blocks that reach the threshold need a sample-by-sample look.
      const clip = this.clip[c]!;
      if (bmax >= this.clipThreshold || -bmin >= this.clipThreshold)
        clip.scan(x, from, to, frameAt, this.clipThreshold);
      else clip.breakRun();
      // True peak. Outputs that would lean on the zeros assumed before the file's first sample
      // are skipped: they show the interpolator's ringing at an abrupt start (a step from
      // silence), not the signal (which the first-sample level reports). The end is not
      // flushed, for the same reason.
      const floor = this.truePeak[c]!;
      const tpFrom =
        this.oversampling === 1 ? from : Math.max(from, from + (TRUE_PEAK_SETTLE_FRAMES - frameAt));
      if (tpFrom >= to) this.scan.atIndex = -1;
      else if (this.simd && this.oversampling !== 1)
        this.simd.scan(c, tpFrom, to, this.oversampling, floor, this.scan);
      else if (this.oversampling === 4) scanTruePeak4x(x, tpFrom, to, floor, this.scan);
      else if (this.oversampling === 2) scanTruePeak2x(x, tpFrom, to, floor, this.scan);
      else scanSamplePeak(x, tpFrom, to, floor, this.scan);
      if (this.scan.atIndex >= 0) {
        this.truePeak[c] = this.scan.peak;
        const delay = this.oversampling === 1 ? 0 : TRUE_PEAK_DELAY_SAMPLES - 0.375;
        this.truePeakAt[c] = Math.max(0, frameAt + (this.scan.atIndex - from) - delay);
      }
    }
    this.findLoudEdges(from, to, frameAt, blockMin, blockMax);
    if (channels >= 2) {
      accumulateCorrelation(
        this.samples[0]!,
        this.samples[1]!,
        from,
        to,
        this.lowPass,
        this.lowPassState,
        this.correlationAcc,
      );
    }
  }

  private findLoudEdges(
    from: number,
    to: number,
    frameAt: number,
    blockMin: Float64Array,
    blockMax: Float64Array,
  ): void {
    const threshold = this.silenceThreshold;
    let first = -1;
    let last = -1;
    for (let c = 0; c < this.channelCount; c++) {
      if (blockMax[c]! < threshold && -blockMin[c]! < threshold) continue;
      const x = this.samples[c]!;
      if (this.firstLoudFrame < 0) {
        const limit = first < 0 ? to : first;
        for (let i = from; i < limit; i++) {
          if (Math.abs(x[i]!) >= threshold) {
            first = i;
            break;
          }
        }
      }
      for (let i = to - 1; i > last && i >= from; i--) {
        if (Math.abs(x[i]!) >= threshold) {
          last = i;
          break;
        }
      }
    }
    if (this.firstLoudFrame < 0 && first >= 0) this.firstLoudFrame = frameAt + (first - from);
    if (last >= 0) this.lastLoudFrame = frameAt + (last - from);
  }

  /** Ends the segment; frames that never arrived are left out (the caller checks the count). */
  finish(): SegmentResult {
    if (this.filled > 0) {
      const frames = this.filled;
      this.filled = 0;
      this.processBlock(frames);
    }
    if (this.cursor > this.plan.startFrame && this.microCount < this.microSums.length) {
      // A final micro-block cut short by the end of the file keeps its partial sum.
      this.microSums[this.microCount++] = this.microAccumulator;
      this.microAccumulator = 0;
    }
    const channels: ChannelSegmentResult[] = [];
    for (let c = 0; c < this.channelCount; c++) {
      const s = this.stats[c]!;
      const decode = this.decodeStats[c]!;
      channels.push({
        min: s[0]!,
        max: s[1]!,
        sum: s[2]!,
        orBits: decode.orBits,
        offGrid: decode.offGrid,
        truePeak: this.truePeak[c]!,
        truePeakAtFrame: this.truePeakAt[c]!,
        clipping: this.clip[c]!.summarise(),
        firstSample: this.firstSamples[c]!,
        lastSample: this.lastSamples[c]!,
      });
    }
    const a = this.correlationAcc;
    const correlation: CorrelationSums | null =
      this.channelCount >= 2
        ? {
            n: a[0]!,
            sl: a[1]!,
            sr: a[2]!,
            sll: a[3]!,
            srr: a[4]!,
            slr: a[5]!,
            ql: a[6]!,
            qr: a[7]!,
            qll: a[8]!,
            qrr: a[9]!,
            qlr: a[10]!,
            identical: a[11] === 0,
            inverted: a[12] === 0,
          }
        : null;
    return {
      startFrame: this.plan.startFrame,
      endFrame: Math.min(this.plan.endFrame, this.cursor),
      firstMicroBlock: this.firstMicroBlock,
      microBlockSums: this.microSums.subarray(0, this.microCount),
      channels,
      firstLoudFrame: this.firstLoudFrame,
      lastLoudFrame: this.lastLoudFrame,
      waveform: { firstBin: this.waveformFirstBin, min: this.waveformMin, max: this.waveformMax },
      correlation,
    };
  }
}
