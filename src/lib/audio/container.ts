import type { ByteSource } from './byte-source.ts';
import { AudioAnalysisError } from './errors.ts';
import { parseBext, parseId3, parseInfoList, parseIxml, readFixedText } from './tags.ts';
import type { AudioTags } from './types.ts';

/** How one sample is stored: signedness/float, width and byte order. */
export type SampleCoding =
  | 'u8'
  | 'i8'
  | 'i16le'
  | 'i24le'
  | 'i32le'
  | 'f32le'
  | 'f64le'
  | 'i16be'
  | 'i24be'
  | 'i32be'
  | 'f32be'
  | 'f64be';

/** What the header says, checked for sense; everything the decoder needs. */
export interface ContainerInfo {
  container: string;
  encoding: 'pcm-int' | 'pcm-float';
  coding: SampleCoding;
  sampleRateHz: number;
  channels: number;
  bitsPerSample: number;
  bytesPerSample: number;
  blockAlign: number;
  /** WAVE_FORMAT_EXTENSIBLE speaker mask, null when the file has none. */
  channelMask: number | null;
  dataOffset: number;
  /** Bytes of whole frames in the data chunk. */
  dataBytes: number;
  frames: number;
  tags: AudioTags;
}

export interface ParsedContainer {
  info: ContainerInfo;
  /**
   * Reads the chunks after the audio data (tags often follow it). Already done for files;
   * a stream calls it once the audio has been consumed.
   */
  readTrailingChunks(): Promise<void>;
}

// Highest rate accepted: 768 kHz is the highest rate in use (common practice); twice that
// leaves room. Lowest: 1 kHz, below any audio format in use (common practice).
const MAX_SAMPLE_RATE_HZ = 1_536_000;
const MIN_SAMPLE_RATE_HZ = 1_000;
// More channels than any delivery format carries (common practice: 22.2 has 24).
const MAX_CHANNELS = 128;
// Tag chunks larger than this are skipped rather than read into memory.
const MAX_TAG_CHUNK_BYTES = 4 * 1024 * 1024;

// WAVE format tags (Microsoft mmreg.h, as listed in RFC 2361).
const WAVE_FORMAT_PCM = 0x0001;
const WAVE_FORMAT_IEEE_FLOAT = 0x0003;
const WAVE_FORMAT_EXTENSIBLE = 0xfffe;
const WAVE_FORMAT_NAMES: Record<number, string> = {
  2: 'Microsoft ADPCM',
  6: 'A-law',
  7: 'µ-law',
  17: 'IMA ADPCM',
  80: 'MPEG audio',
  85: 'MP3',
  255: 'AAC',
  146: 'Dolby AC-3',
  8192: 'Dolby AC-3',
  61868: 'FLAC',
};

const ascii = new TextDecoder('latin1');

function readFourCc(bytes: Uint8Array, at: number): string {
  return ascii.decode(bytes.subarray(at, at + 4));
}

function isPlausibleChunkId(bytes: Uint8Array, at: number): boolean {
  if (at + 4 > bytes.length) return false;
  for (let i = at; i < at + 4; i++) {
    const b = bytes[i]!;
    if (b < 0x20 || b > 0x7e) return false;
  }
  return true;
}

/**
 * Reads the container header of a WAV/BWF/RF64/BW64/AIFF/AIFF-C source. Anything else is
 * identified (music-metadata) and refused with a typed error naming the format.
 */
export async function parseContainer(source: ByteSource): Promise<ParsedContainer> {
  const head = await source.read(0, 12);
  if (head.length === 0) {
    throw new AudioAnalysisError('empty-file', 'The file is empty (0 bytes).');
  }
  const magic = head.length >= 4 ? readFourCc(head, 0) : '';
  const form = head.length >= 12 ? readFourCc(head, 8) : '';
  let parsed: ParsedContainer;
  if ((magic === 'RIFF' || magic === 'RF64' || magic === 'BW64') && form === 'WAVE') {
    parsed = await parseWave(source, magic);
  } else if (magic === 'FORM' && (form === 'AIFF' || form === 'AIFC')) {
    parsed = await parseAiff(source, form);
  } else {
    throw await refuseOtherFormat(source, head);
  }
  if (source.randomAccess) await parsed.readTrailingChunks();
  return parsed;
}

async function refuseOtherFormat(
  source: ByteSource,
  head: Uint8Array,
): Promise<AudioAnalysisError> {
  const magic = ascii.decode(head.subarray(0, 4));
  if (magic === 'RIFF' || magic === 'RIFX' || magic === 'FORM') {
    if (head.length < 12) {
      return new AudioAnalysisError(
        'truncated',
        'The file ends inside its header (fewer than 12 bytes).',
      );
    }
    return new AudioAnalysisError(
      'not-audio',
      `The file is a ${magic} container of type "${ascii.decode(head.subarray(8, 12)).trim()}", not WAV or AIFF audio.`,
    );
  }
  const sample = await source.read(0, 256 * 1024);
  const name = await identifyWithMusicMetadata(sample);
  if (name === null) {
    return new AudioAnalysisError(
      'not-audio',
      'The file is not audio we recognise (no WAV, AIFF or other audio header).',
    );
  }
  return new AudioAnalysisError(
    'unsupported-format',
    `The file is ${name}; Quayside measures uncompressed WAV (including BWF and RF64) and AIFF masters. Export the master as WAV or AIFF.`,
    name.toLowerCase(),
  );
}

async function identifyWithMusicMetadata(sample: Uint8Array): Promise<string | null> {
  try {
    const { parseBuffer } = await import('music-metadata');
    const metadata = await parseBuffer(sample, undefined, { duration: false, skipCovers: true });
    const { container, codec } = metadata.format;
    if (container === undefined && codec === undefined) return null;
    if (container && codec && !container.toLowerCase().includes(codec.toLowerCase())) {
      return `${container} (${codec})`;
    }
    return container ?? codec ?? null;
  } catch {
    return null;
  }
}

interface WaveFmt {
  formatTag: number;
  channels: number;
  sampleRateHz: number;
  blockAlign: number;
  bitsPerSample: number;
  channelMask: number | null;
}

interface ChunkWalkState {
  position: number;
  end: number;
}

/**
 * A reader for the chunks after the audio data (tags some writers put at the end), started
 * where the walk stopped; at most 10 000 chunks, so a damaged file cannot loop forever.
 */
function trailingChunkReader(options: {
  source: ByteSource;
  position: number;
  end: number;
  previousWasOdd: boolean;
  littleEndian: boolean;
  visit: (id: string, size: number, bodyOffset: number) => Promise<void>;
  finish: () => void;
}): () => Promise<void> {
  return async () => {
    const trailing: ChunkWalkState = { position: options.position, end: options.end };
    let odd = options.previousWasOdd;
    for (let count = 0; count < 10_000; count++) {
      const chunk = await readChunkHeader(options.source, trailing, options.littleEndian, odd);
      if (chunk === null) break;
      await options.visit(chunk.id, chunk.size, chunk.bodyOffset);
      trailing.position = chunk.bodyOffset + chunk.size + (chunk.size % 2);
      odd = chunk.size % 2 === 1;
    }
    options.finish();
  };
}

/**
 * Next chunk header at state.position, tolerating writers that leave out the pad byte after an
 * odd-sized chunk. Returns null at the end or when the bytes there are not a chunk header.
 */
async function readChunkHeader(
  source: ByteSource,
  state: ChunkWalkState,
  littleEndian: boolean,
  previousWasOdd: boolean,
): Promise<{ id: string; size: number; bodyOffset: number } | null> {
  if (state.position + 8 > state.end) return null;
  // One byte early when the previous chunk was odd, so both candidates can be checked.
  const probeAt = previousWasOdd ? state.position - 1 : state.position;
  const probe = await source.read(probeAt, 9);
  let at = previousWasOdd ? 1 : 0;
  if (!isPlausibleChunkId(probe, at)) {
    if (previousWasOdd && isPlausibleChunkId(probe, 0)) at = 0;
    else return null;
  }
  if (probe.length < at + 8) return null;
  const view = new DataView(probe.buffer, probe.byteOffset, probe.byteLength);
  const start = probeAt + at;
  return {
    id: readFourCc(probe, at),
    size: view.getUint32(at + 4, littleEndian),
    bodyOffset: start + 8,
  };
}

async function readChunkBody(
  source: ByteSource,
  offset: number,
  size: number,
): Promise<Uint8Array | null> {
  if (size > MAX_TAG_CHUNK_BYTES) return null;
  return source.read(offset, size);
}

async function parseWave(source: ByteSource, magic: string): Promise<ParsedContainer> {
  const fileEnd = source.sizeBytes ?? Number.MAX_SAFE_INTEGER;
  const state: ChunkWalkState = { position: 12, end: fileEnd };
  const tags: AudioTags = {};
  const text: Record<string, string> = {};
  let fmt: WaveFmt | null = null;
  let ds64DataBytes: number | null = null;
  let data: { offset: number; declaredBytes: number } | null = null;
  let hasBext = false;
  let previousWasOdd = false;

  const visit = async (id: string, size: number, bodyOffset: number): Promise<void> => {
    if (id === 'ds64' && size >= 24) {
      const body = await source.read(bodyOffset, 28);
      if (body.length >= 24) {
        const view = new DataView(body.buffer, body.byteOffset, body.byteLength);
        // EBU Tech 3306: ds64 = riffSize (u64), dataSize (u64), sampleCount (u64), table length.
        ds64DataBytes = view.getUint32(8, true) + view.getUint32(12, true) * 2 ** 32;
      }
    } else if (id === 'fmt ') {
      fmt = parseWaveFmt(await source.read(bodyOffset, Math.min(size, 64)));
    } else if (id === 'bext') {
      const body = await readChunkBody(source, bodyOffset, size);
      const bext = body ? parseBext(body) : null;
      if (bext) {
        tags.bext = bext;
        hasBext = true;
      }
    } else if (id === 'LIST') {
      const body = await readChunkBody(source, bodyOffset, size);
      if (body) parseInfoList(body, text);
    } else if (id === 'iXML') {
      const body = await readChunkBody(source, bodyOffset, size);
      if (body) parseIxml(body, text);
    } else if (id === 'id3 ' || id === 'ID3 ') {
      const body = await readChunkBody(source, bodyOffset, size);
      if (body) parseId3(body, tags);
    }
  };

  // Walk to the data chunk (and the fmt chunk, which files put first in practice).
  while (data === null) {
    const chunk = await readChunkHeader(source, state, true, previousWasOdd);
    if (chunk === null) break;
    let size = chunk.size;
    if (chunk.id === 'data') {
      if (size === 0xffffffff) {
        // RF64/BW64 keep the real size in ds64; a plain RIFF writer that could not seek back
        // leaves 0xFFFFFFFF, meaning "to the end of the file" (common practice).
        size = ds64DataBytes ?? Math.max(0, fileEnd - chunk.bodyOffset);
      }
      data = { offset: chunk.bodyOffset, declaredBytes: size };
    } else {
      await visit(chunk.id, size, chunk.bodyOffset);
    }
    state.position = chunk.bodyOffset + size + (size % 2);
    previousWasOdd = size % 2 === 1;
  }

  const readTrailingChunks = trailingChunkReader({
    source,
    position: state.position,
    end: fileEnd,
    previousWasOdd,
    littleEndian: true,
    visit,
    finish: () => finishTags(tags, text),
  });

  if (fmt === null && data !== null && source.randomAccess) {
    // Some writers put fmt after data; files can look ahead for it.
    const saved = tags.bext;
    await readTrailingChunks();
    if (saved) tags.bext = saved;
  }
  const waveFmt = fmt as WaveFmt | null;
  if (waveFmt === null) {
    if (data === null && (source.sizeBytes ?? 0) < 44) {
      throw new AudioAnalysisError('truncated', 'The file ends inside its WAV header.');
    }
    throw new AudioAnalysisError(
      'bad-header',
      'The WAV file has no format ("fmt ") chunk, so its sample format is unknown.',
    );
  }
  if (data === null) {
    throw new AudioAnalysisError('no-audio-data', 'The WAV file has no audio ("data") chunk.');
  }
  const wave = waveFmt as WaveFmt;
  const found = data as { offset: number; declaredBytes: number };
  const container = magic === 'RF64' ? 'rf64' : magic === 'BW64' ? 'bw64' : hasBext ? 'bwf' : 'wav';
  const { encoding, coding, bytesPerSample } = chooseWaveCoding(wave);
  const info = checkFormat({
    container,
    encoding,
    coding,
    sampleRateHz: wave.sampleRateHz,
    channels: wave.channels,
    bitsPerSample: bytesPerSample * 8,
    bytesPerSample,
    blockAlign: wave.blockAlign,
    channelMask: wave.channelMask,
    dataOffset: found.offset,
    declaredDataBytes: found.declaredBytes,
    sizeBytes: source.sizeBytes,
    tags,
  });
  return { info, readTrailingChunks };
}

function parseWaveFmt(body: Uint8Array): WaveFmt {
  if (body.length < 16) {
    throw new AudioAnalysisError(
      'bad-header',
      `The WAV format chunk is ${body.length} bytes long; it needs at least 16.`,
    );
  }
  const view = new DataView(body.buffer, body.byteOffset, body.byteLength);
  let formatTag = view.getUint16(0, true);
  let channelMask: number | null = null;
  if (formatTag === WAVE_FORMAT_EXTENSIBLE && body.length >= 40) {
    channelMask = view.getUint32(20, true);
    // WAVEFORMATEXTENSIBLE: the sub-format GUID starts with the ordinary format tag.
    formatTag = view.getUint16(24, true);
  }
  return {
    formatTag,
    channels: view.getUint16(2, true),
    sampleRateHz: view.getUint32(4, true),
    blockAlign: view.getUint16(12, true),
    bitsPerSample: view.getUint16(14, true),
    channelMask,
  };
}

function chooseWaveCoding(fmt: WaveFmt): {
  encoding: 'pcm-int' | 'pcm-float';
  coding: SampleCoding;
  bytesPerSample: number;
} {
  const containerBytes = Math.ceil(fmt.bitsPerSample / 8);
  if (fmt.formatTag === WAVE_FORMAT_PCM) {
    const coding = ({ 1: 'u8', 2: 'i16le', 3: 'i24le', 4: 'i32le' } as const)[containerBytes];
    if (coding) return { encoding: 'pcm-int', coding, bytesPerSample: containerBytes };
  } else if (fmt.formatTag === WAVE_FORMAT_IEEE_FLOAT) {
    const coding = ({ 4: 'f32le', 8: 'f64le' } as const)[containerBytes];
    if (coding && fmt.bitsPerSample % 8 === 0)
      return { encoding: 'pcm-float', coding, bytesPerSample: containerBytes };
  } else {
    const name =
      WAVE_FORMAT_NAMES[fmt.formatTag] ??
      `format tag 0x${fmt.formatTag.toString(16).padStart(4, '0')}`;
    throw new AudioAnalysisError(
      'unsupported-format',
      `The WAV file holds ${name} audio, not PCM; Quayside measures uncompressed PCM masters.`,
      name.toLowerCase(),
    );
  }
  if (fmt.channels === 0) throw createZeroChannelsError();
  throw new AudioAnalysisError(
    'unsupported-bit-depth',
    `The WAV file says ${fmt.bitsPerSample} bits per sample, which is not a PCM sample size Quayside reads (8, 16, 24, 32-bit integer; 32, 64-bit float).`,
  );
}

function createZeroChannelsError(): AudioAnalysisError {
  return new AudioAnalysisError('zero-channels', 'The header says the file has 0 channels.');
}

interface FormatToCheck {
  container: string;
  encoding: 'pcm-int' | 'pcm-float';
  coding: SampleCoding;
  sampleRateHz: number;
  channels: number;
  bitsPerSample: number;
  bytesPerSample: number;
  blockAlign: number;
  channelMask: number | null;
  dataOffset: number;
  declaredDataBytes: number;
  sizeBytes: number | null;
  tags: AudioTags;
}

function checkFormat(format: FormatToCheck): ContainerInfo {
  if (format.channels === 0) throw createZeroChannelsError();
  if (format.channels > MAX_CHANNELS) {
    throw new AudioAnalysisError(
      'bad-header',
      `The header says the file has ${format.channels} channels, more than any audio format carries.`,
    );
  }
  if (
    !Number.isFinite(format.sampleRateHz) ||
    format.sampleRateHz < MIN_SAMPLE_RATE_HZ ||
    format.sampleRateHz > MAX_SAMPLE_RATE_HZ
  ) {
    throw new AudioAnalysisError(
      'absurd-sample-rate',
      `The header says the sample rate is ${format.sampleRateHz} Hz, which no audio file uses.`,
    );
  }
  const blockAlign = format.channels * format.bytesPerSample;
  if (format.blockAlign !== blockAlign) {
    throw new AudioAnalysisError(
      'bad-header',
      `The header's block size (${format.blockAlign} bytes) does not match ${format.channels} channels of ${format.bytesPerSample}-byte samples.`,
    );
  }
  const available =
    format.sizeBytes === null ? Number.MAX_SAFE_INTEGER : format.sizeBytes - format.dataOffset;
  if (format.declaredDataBytes > available) {
    throw new AudioAnalysisError(
      'truncated',
      `The file is truncated: its header announces ${format.declaredDataBytes} bytes of audio but only ${Math.max(0, available)} are present.`,
    );
  }
  const frames = Math.floor(format.declaredDataBytes / blockAlign);
  return {
    container: format.container,
    encoding: format.encoding,
    coding: format.coding,
    sampleRateHz: format.sampleRateHz,
    channels: format.channels,
    bitsPerSample: format.bitsPerSample,
    bytesPerSample: format.bytesPerSample,
    blockAlign,
    channelMask: format.channelMask,
    dataOffset: format.dataOffset,
    dataBytes: frames * blockAlign,
    frames,
    tags: format.tags,
  };
}

/** 80-bit IEEE 754 extended (AIFF COMM sample rate). */
function readExtended(bytes: Uint8Array, at: number): number {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const exponentWord = view.getUint16(at, false);
  const sign = exponentWord & 0x8000 ? -1 : 1;
  const exponent = exponentWord & 0x7fff;
  const mantissa = view.getUint32(at + 2, false) * 2 ** 32 + view.getUint32(at + 6, false);
  if (exponent === 0 && mantissa === 0) return 0;
  if (exponent === 0x7fff) return Number.NaN;
  return sign * mantissa * 2 ** (exponent - 16383 - 63);
}

const AIFF_TEXT_CHUNKS: Record<string, string> = {
  NAME: 'AIFF.NAME',
  AUTH: 'AIFF.AUTH',
  '(c) ': 'AIFF.COPYRIGHT',
  ANNO: 'AIFF.ANNO',
};

async function parseAiff(source: ByteSource, form: string): Promise<ParsedContainer> {
  const fileEnd = source.sizeBytes ?? Number.MAX_SAFE_INTEGER;
  const state: ChunkWalkState = { position: 12, end: fileEnd };
  const tags: AudioTags = {};
  const text: Record<string, string> = {};
  let comm: {
    channels: number;
    frames: number;
    bits: number;
    sampleRateHz: number;
    compression: string;
  } | null = null;
  let ssnd: { offset: number; declaredBytes: number } | null = null;

  const visit = async (id: string, size: number, bodyOffset: number): Promise<void> => {
    if (id === 'COMM') {
      const body = await source.read(bodyOffset, Math.min(size, 64));
      if (body.length < 18) {
        throw new AudioAnalysisError('bad-header', 'The AIFF COMM chunk is too short.');
      }
      const view = new DataView(body.buffer, body.byteOffset, body.byteLength);
      comm = {
        channels: view.getInt16(0, false),
        frames: view.getUint32(2, false),
        bits: view.getInt16(6, false),
        sampleRateHz: readExtended(body, 8),
        compression: form === 'AIFC' && body.length >= 22 ? readFourCc(body, 18) : 'NONE',
      };
    } else if (id in AIFF_TEXT_CHUNKS) {
      const body = await readChunkBody(source, bodyOffset, Math.min(size, 65_536));
      const key = AIFF_TEXT_CHUNKS[id];
      if (body && key) {
        const value = readFixedText(body, 0, body.length);
        if (value !== '') text[key] = value;
      }
    } else if (id === 'ID3 ' || id === 'id3 ') {
      const body = await readChunkBody(source, bodyOffset, size);
      if (body) parseId3(body, tags);
    }
  };

  let previousWasOdd = false;
  while (ssnd === null) {
    const chunk = await readChunkHeader(source, state, false, previousWasOdd);
    if (chunk === null) break;
    if (chunk.id === 'SSND') {
      const header = await source.read(chunk.bodyOffset, 8);
      const offset =
        header.length >= 4 ? new DataView(header.buffer, header.byteOffset).getUint32(0, false) : 0;
      ssnd = {
        offset: chunk.bodyOffset + 8 + offset,
        declaredBytes: Math.max(0, chunk.size - 8 - offset),
      };
    } else {
      await visit(chunk.id, chunk.size, chunk.bodyOffset);
    }
    state.position = chunk.bodyOffset + chunk.size + (chunk.size % 2);
    previousWasOdd = chunk.size % 2 === 1;
  }
  const readTrailingChunks = trailingChunkReader({
    source,
    position: state.position,
    end: fileEnd,
    previousWasOdd,
    littleEndian: false,
    visit,
    finish: () => finishTags(tags, text),
  });
  if (comm === null && ssnd !== null && source.randomAccess) await readTrailingChunks();
  const common = comm as {
    channels: number;
    frames: number;
    bits: number;
    sampleRateHz: number;
    compression: string;
  } | null;
  if (common === null) {
    throw new AudioAnalysisError(
      'bad-header',
      'The AIFF file has no COMM chunk, so its sample format is unknown.',
    );
  }
  if (ssnd === null) {
    throw new AudioAnalysisError('no-audio-data', 'The AIFF file has no sound data (SSND) chunk.');
  }
  const sound = ssnd as { offset: number; declaredBytes: number };
  if (common.channels <= 0) throw createZeroChannelsError();
  const bytesPerSample = Math.ceil(common.bits / 8);
  const compression = common.compression;
  let coding: SampleCoding | undefined;
  let encoding: 'pcm-int' | 'pcm-float' = 'pcm-int';
  // AIFF-C compression types (Apple AIFF-C specification; 'sowt' is little-endian integer).
  if (
    compression === 'NONE' ||
    compression === 'twos' ||
    compression === 'in24' ||
    compression === 'in32'
  ) {
    coding = ({ 1: 'i8', 2: 'i16be', 3: 'i24be', 4: 'i32be' } as const)[bytesPerSample];
  } else if (compression === 'sowt') {
    coding = ({ 2: 'i16le', 3: 'i24le', 4: 'i32le' } as const)[bytesPerSample];
  } else if (compression === 'fl32' || compression === 'FL32') {
    coding = 'f32be';
    encoding = 'pcm-float';
  } else if (compression === 'fl64' || compression === 'FL64') {
    coding = 'f64be';
    encoding = 'pcm-float';
  } else {
    throw new AudioAnalysisError(
      'unsupported-format',
      `The AIFF-C file is compressed ("${compression.trim()}"); Quayside measures uncompressed masters.`,
      `aifc-${compression.trim().toLowerCase()}`,
    );
  }
  const codingBytes = coding === 'f32be' ? 4 : coding === 'f64be' ? 8 : bytesPerSample;
  if (coding === undefined) {
    throw new AudioAnalysisError(
      'unsupported-bit-depth',
      `The AIFF file says ${common.bits} bits per sample, which Quayside does not read.`,
    );
  }
  const blockAlign = common.channels * codingBytes;
  // COMM gives the frame count; the SSND chunk may be longer (padding) but not shorter.
  const declaredDataBytes = Math.min(sound.declaredBytes, common.frames * blockAlign);
  if (common.frames * blockAlign > sound.declaredBytes) {
    throw new AudioAnalysisError(
      'truncated',
      `The AIFF file is truncated: COMM announces ${common.frames} frames but the sound chunk holds ${Math.floor(sound.declaredBytes / blockAlign)}.`,
    );
  }
  const info = checkFormat({
    container: form === 'AIFC' ? 'aifc' : 'aiff',
    encoding,
    coding,
    sampleRateHz: common.sampleRateHz,
    channels: common.channels,
    bitsPerSample: codingBytes * 8,
    bytesPerSample: codingBytes,
    blockAlign,
    channelMask: null,
    dataOffset: sound.offset,
    declaredDataBytes,
    sizeBytes: source.sizeBytes,
    tags,
  });
  return { info, readTrailingChunks };
}

function finishTags(tags: AudioTags, text: Record<string, string>): void {
  if (Object.keys(text).length > 0) tags.text = { ...text, ...tags.text };
}
