/** Test-signal synthesis and WAV writing for the audio tests (no dependencies). */
import { Readable } from 'node:stream';

export type Channels = Float64Array[];

export function dbToAmplitude(db: number): number {
  return 10 ** (db / 20);
}

/** Sine of `amplitude` at `frequencyHz`, `seconds` long, starting at phase `phaseRadians`. */
export function sine(
  sampleRateHz: number,
  seconds: number,
  frequencyHz: number,
  amplitude: number,
  phaseRadians = 0,
): Float64Array {
  const n = Math.round(seconds * sampleRateHz);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++)
    out[i] = amplitude * Math.sin((2 * Math.PI * frequencyHz * i) / sampleRateHz + phaseRadians);
  return out;
}

export function silence(sampleRateHz: number, seconds: number): Float64Array {
  return new Float64Array(Math.round(seconds * sampleRateHz));
}

export function concat(...parts: Float64Array[]): Float64Array {
  const out = new Float64Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Deterministic pseudo-random generator (LCG, Numerical Recipes constants). */
export function createRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (Math.imul(state, 1_664_525) + 1_013_904_223) >>> 0;
    return state / 2 ** 32;
  };
}

/** Pink noise (Paul Kellet's refined filter, common practice) scaled to `rmsDbfs` RMS. */
export function pinkNoise(
  sampleRateHz: number,
  seconds: number,
  rmsDbfs: number,
  seed = 1,
): Float64Array {
  const random = createRandom(seed);
  const n = Math.round(seconds * sampleRateHz);
  const out = new Float64Array(n);
  let b0 = 0,
    b1 = 0,
    b2 = 0,
    b3 = 0,
    b4 = 0,
    b5 = 0,
    b6 = 0;
  let sumSquares = 0;
  for (let i = 0; i < n; i++) {
    const white = random() * 2 - 1;
    b0 = 0.99886 * b0 + white * 0.0555179;
    b1 = 0.99332 * b1 + white * 0.0750759;
    b2 = 0.969 * b2 + white * 0.153852;
    b3 = 0.8665 * b3 + white * 0.3104856;
    b4 = 0.55 * b4 + white * 0.5329522;
    b5 = -0.7616 * b5 - white * 0.016898;
    const v = b0 + b1 + b2 + b3 + b4 + b5 + b6 + white * 0.5362;
    b6 = white * 0.115926;
    out[i] = v;
    sumSquares += v * v;
  }
  const gain = dbToAmplitude(rmsDbfs) / Math.sqrt(sumSquares / Math.max(1, n));
  for (let i = 0; i < n; i++) out[i]! *= gain;
  return out;
}

export function scale(x: Float64Array, gain: number): Float64Array {
  return x.map((v) => v * gain);
}

export type SampleFormat = 'int16' | 'int24' | 'int32' | 'float32' | 'float64';

export interface WavOptions {
  format?: SampleFormat;
  /** Write WAVE_FORMAT_EXTENSIBLE with this channel mask. */
  extensibleMask?: number;
  /** Extra chunks (id, body) placed before the data chunk. */
  chunksBefore?: { id: string; body: Uint8Array }[];
  chunksAfter?: { id: string; body: Uint8Array }[];
  rf64?: boolean;
}

function bytesOf(format: SampleFormat): number {
  return { int16: 2, int24: 3, int32: 4, float32: 4, float64: 8 }[format];
}

export function chunk(id: string, body: Uint8Array): Buffer {
  const header = Buffer.alloc(8);
  header.write(id, 0, 'latin1');
  header.writeUInt32LE(body.length, 4);
  return Buffer.concat([
    header,
    Buffer.from(body),
    body.length % 2 ? Buffer.alloc(1) : Buffer.alloc(0),
  ]);
}

/** Interleaved PCM data for `channels` (clipped to full scale for integer formats). */
export function encodePcm(channels: Channels, format: SampleFormat, bigEndian = false): Buffer {
  const frames = channels[0]?.length ?? 0;
  const width = bytesOf(format);
  const out = Buffer.alloc(frames * channels.length * width);
  let o = 0;
  for (let i = 0; i < frames; i++) {
    for (const ch of channels) {
      const v = ch[i]!;
      if (format === 'float32') bigEndian ? out.writeFloatBE(v, o) : out.writeFloatLE(v, o);
      else if (format === 'float64') bigEndian ? out.writeDoubleBE(v, o) : out.writeDoubleLE(v, o);
      else {
        const bits = width * 8;
        const full = 2 ** (bits - 1);
        const code = Math.max(-full, Math.min(full - 1, Math.round(v * full)));
        if (bigEndian) out.writeIntBE(code, o, width);
        else out.writeIntLE(code, o, width);
      }
      o += width;
    }
  }
  return out;
}

export function writeWav(
  channels: Channels,
  sampleRateHz: number,
  options: WavOptions = {},
): Buffer {
  const format = options.format ?? 'float32';
  const width = bytesOf(format);
  const isFloat = format === 'float32' || format === 'float64';
  const channelCount = channels.length;
  const fmt = Buffer.alloc(options.extensibleMask !== undefined ? 40 : 16);
  fmt.writeUInt16LE(options.extensibleMask !== undefined ? 0xfffe : isFloat ? 3 : 1, 0);
  fmt.writeUInt16LE(channelCount, 2);
  fmt.writeUInt32LE(sampleRateHz, 4);
  fmt.writeUInt32LE(sampleRateHz * channelCount * width, 8);
  fmt.writeUInt16LE(channelCount * width, 12);
  fmt.writeUInt16LE(width * 8, 14);
  if (options.extensibleMask !== undefined) {
    fmt.writeUInt16LE(22, 16);
    fmt.writeUInt16LE(width * 8, 18);
    fmt.writeUInt32LE(options.extensibleMask, 20);
    // KSDATAFORMAT_SUBTYPE_PCM / _IEEE_FLOAT GUID: the format tag, then a fixed tail.
    fmt.writeUInt16LE(isFloat ? 3 : 1, 24);
    Buffer.from([
      0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71,
    ]).copy(fmt, 26);
  }
  const data = encodePcm(channels, format);
  const parts: Buffer[] = [];
  if (options.rf64) {
    const ds64 = Buffer.alloc(28);
    parts.push(chunk('ds64', ds64));
  }
  parts.push(chunk('fmt ', fmt));
  for (const c of options.chunksBefore ?? []) parts.push(chunk(c.id, c.body));
  const dataChunk = chunk('data', data);
  const dataAt = 12 + parts.reduce((n, p) => n + p.length, 0);
  parts.push(dataChunk);
  for (const c of options.chunksAfter ?? []) parts.push(chunk(c.id, c.body));
  const body = Buffer.concat(parts);
  const head = Buffer.alloc(12);
  head.write(options.rf64 ? 'RF64' : 'RIFF', 0, 'latin1');
  head.writeUInt32LE(options.rf64 ? 0xffffffff : 4 + body.length, 4);
  head.write('WAVE', 8, 'latin1');
  const file = Buffer.concat([head, body]);
  if (options.rf64) {
    // ds64 body starts at 20: riffSize, dataSize, sampleCount (u64 little-endian).
    file.writeBigUInt64LE(BigInt(file.length - 8), 20);
    file.writeBigUInt64LE(BigInt(data.length), 28);
    file.writeBigUInt64LE(BigInt(channels[0]?.length ?? 0), 36);
    file.writeUInt32LE(0xffffffff, dataAt + 4);
  }
  return file;
}

/** 80-bit IEEE extended for AIFF's COMM sample rate. */
function extended(value: number): Buffer {
  const out = Buffer.alloc(10);
  const exponent = Math.floor(Math.log2(value));
  out.writeUInt16BE(exponent + 16383, 0);
  const mantissa = BigInt(Math.round(value * 2 ** (63 - exponent)));
  out.writeBigUInt64BE(mantissa, 2);
  return out;
}

export function writeAiff(
  channels: Channels,
  sampleRateHz: number,
  options: { bits?: 16 | 24; compression?: 'NONE' | 'sowt' | 'fl32' } = {},
): Buffer {
  const compression = options.compression;
  const aifc = compression !== undefined;
  const bits = compression === 'fl32' ? 32 : (options.bits ?? 16);
  const frames = channels[0]?.length ?? 0;
  const be = (id: string, body: Buffer): Buffer => {
    const header = Buffer.alloc(8);
    header.write(id, 0, 'latin1');
    header.writeUInt32BE(body.length, 4);
    return Buffer.concat([header, body, body.length % 2 ? Buffer.alloc(1) : Buffer.alloc(0)]);
  };
  const comm = Buffer.alloc(aifc ? 24 : 18);
  comm.writeInt16BE(channels.length, 0);
  comm.writeUInt32BE(frames, 2);
  comm.writeInt16BE(bits, 6);
  extended(sampleRateHz).copy(comm, 8);
  if (aifc) {
    comm.write(compression, 18, 'latin1');
    comm.writeUInt16BE(0, 22);
  }
  const format: SampleFormat = compression === 'fl32' ? 'float32' : bits === 24 ? 'int24' : 'int16';
  const pcm = encodePcm(channels, format, compression !== 'sowt');
  const ssnd = Buffer.concat([Buffer.alloc(8), pcm]);
  const body = Buffer.concat([be('COMM', comm), be('SSND', ssnd)]);
  const head = Buffer.alloc(12);
  head.write('FORM', 0, 'latin1');
  head.writeUInt32BE(4 + body.length, 4);
  head.write(aifc ? 'AIFC' : 'AIFF', 8, 'latin1');
  return Buffer.concat([head, body]);
}

/** A Readable delivering `bytes` in chunks of `chunkBytes` (an odd size exercises partial frames). */
export function toReadable(bytes: Uint8Array, chunkBytes = 65_537): Readable {
  let at = 0;
  return new Readable({
    read() {
      if (at >= bytes.length) {
        this.push(null);
        return;
      }
      this.push(Buffer.from(bytes.subarray(at, at + chunkBytes)));
      at += chunkBytes;
    },
  });
}
