import type { SampleCoding } from './container.ts';

/** Result of decoding one channel of a block: OR of all integer codes, and whether a float left the 24-bit grid. */
export interface DecodeStats {
  orBits: number;
  offGrid: boolean;
}

const SCALE_8 = 1 / 128;
const SCALE_16 = 1 / 32_768;
const SCALE_24 = 1 / 8_388_608;
const SCALE_32 = 1 / 2_147_483_648;
// Floats are checked against the grid of 24-bit integer codes (2^23 steps per full scale).
const FLOAT_GRID = 8_388_608;

/**
 * Decodes `frames` frames of channel `channel` from interleaved bytes into out[outAt…],
 * as floats where ±1 is full scale. Integer codes are ORed into stats.orBits so the caller
 * can count the bits that never change (effective bit depth).
 */
export function decodeChannel(
  coding: SampleCoding,
  bytes: Uint8Array,
  view: DataView,
  byteAt: number,
  frames: number,
  blockAlign: number,
  channel: number,
  bytesPerSample: number,
  out: Float32Array,
  outAt: number,
  stats: DecodeStats,
): void {
  let o = byteAt + channel * bytesPerSample;
  let bits = stats.orBits;
  const end = outAt + frames;
  switch (coding) {
    case 'i16le':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = ((bytes[o]! | (bytes[o + 1]! << 8)) << 16) >> 16;
        bits |= v;
        out[i] = v * SCALE_16;
      }
      break;
    case 'i24le':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = ((bytes[o]! | (bytes[o + 1]! << 8) | (bytes[o + 2]! << 16)) << 8) >> 8;
        bits |= v;
        out[i] = v * SCALE_24;
      }
      break;
    case 'i32le':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = bytes[o]! | (bytes[o + 1]! << 8) | (bytes[o + 2]! << 16) | (bytes[o + 3]! << 24);
        bits |= v;
        out[i] = v * SCALE_32;
      }
      break;
    case 'u8':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = bytes[o]! - 128;
        bits |= v;
        out[i] = v * SCALE_8;
      }
      break;
    case 'i8':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = (bytes[o]! << 24) >> 24;
        bits |= v;
        out[i] = v * SCALE_8;
      }
      break;
    case 'i16be':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = (((bytes[o]! << 8) | bytes[o + 1]!) << 16) >> 16;
        bits |= v;
        out[i] = v * SCALE_16;
      }
      break;
    case 'i24be':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = (((bytes[o]! << 16) | (bytes[o + 1]! << 8) | bytes[o + 2]!) << 8) >> 8;
        bits |= v;
        out[i] = v * SCALE_24;
      }
      break;
    case 'i32be':
      for (let i = outAt; i < end; i++, o += blockAlign) {
        const v = (bytes[o]! << 24) | (bytes[o + 1]! << 16) | (bytes[o + 2]! << 8) | bytes[o + 3]!;
        bits |= v;
        out[i] = v * SCALE_32;
      }
      break;
    default:
      decodeFloatChannel(coding, view, o, end, outAt, blockAlign, out, stats, bits);
      return;
  }
  stats.orBits = bits;
}

function decodeFloatChannel(
  coding: SampleCoding,
  view: DataView,
  byteAt: number,
  end: number,
  outAt: number,
  blockAlign: number,
  out: Float32Array,
  stats: DecodeStats,
  orBits: number,
): void {
  let bits = orBits;
  let offGrid = stats.offGrid;
  const littleEndian = coding === 'f32le' || coding === 'f64le';
  const wide = coding === 'f64le' || coding === 'f64be';
  let o = byteAt;
  for (let i = outAt; i < end; i++, o += blockAlign) {
    const x = wide ? view.getFloat64(o, littleEndian) : view.getFloat32(o, littleEndian);
    // NaN and ±Infinity would poison every sum; they count as silence (and as off-grid).
    const finite = x - x === 0;
    out[i] = finite ? x : 0;
    if (!finite) offGrid = true;
    else if (!offGrid) {
      const v = x * FLOAT_GRID;
      if (v === Math.trunc(v)) bits |= v;
      else offGrid = true;
    }
  }
  stats.orBits = bits;
  stats.offGrid = offGrid;
}

/** Bits in use: container bits minus the low bits that are zero in every code; 0 for silence. */
export function countEffectiveBits(orBits: number, codeBits: number): number {
  if (orBits === 0) return 0;
  const lowest = orBits & -orBits;
  const trailingZeros = 31 - Math.clz32(lowest);
  return Math.max(1, codeBits - trailingZeros);
}
