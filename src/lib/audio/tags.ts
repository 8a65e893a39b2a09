import type { AudioTags } from './types.ts';

type Bext = NonNullable<AudioTags['bext']>;

const latin1 = new TextDecoder('latin1');
const utf8 = new TextDecoder('utf-8');

/** Text of a fixed-size, NUL-padded ASCII field, trimmed. */
export function readFixedText(bytes: Uint8Array, from: number, length: number): string {
  const field = bytes.subarray(from, Math.min(bytes.length, from + length));
  const end = field.indexOf(0);
  return latin1
    .decode(end === -1 ? field : field.subarray(0, end))
    .replace(/\s+$/u, '')
    .trim();
}

/**
 * Broadcast WAVE `bext` chunk, EBU Tech 3285 v2 field layout (602 fixed bytes, then the coding
 * history). Returns null when the chunk is too short to hold the fixed part.
 */
export function parseBext(bytes: Uint8Array): Bext | null {
  if (bytes.length < 602) return null;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  // Tech 3285: TimeReference is a 64-bit sample count stored as low then high DWORD.
  const timeReferenceSamples = view.getUint32(338, true) + view.getUint32(342, true) * 2 ** 32;
  const version = view.getUint16(346, true);
  const umidBytes = bytes.subarray(348, 412);
  const umid = umidBytes.some((b) => b !== 0)
    ? Array.from(umidBytes, (b) => b.toString(16).padStart(2, '0')).join('')
    : undefined;
  // Tech 3285 v2: loudness fields are int16 = round(100 × value); 0x7FFF marks "not set" (from memory).
  const readLoudness = (offset: number): number | null => {
    const raw = view.getInt16(offset, true);
    return raw === 0x7fff ? null : raw / 100;
  };
  const bext: Bext = {
    description: readFixedText(bytes, 0, 256),
    originator: readFixedText(bytes, 256, 32),
    originatorReference: readFixedText(bytes, 288, 32),
    originationDate: readFixedText(bytes, 320, 10),
    originationTime: readFixedText(bytes, 330, 8),
    timeReferenceSamples,
    version,
    codingHistory: readFixedText(bytes, 602, bytes.length - 602),
  };
  if (umid !== undefined) bext.umid = umid;
  if (version >= 2) {
    bext.loudnessValueLufs = readLoudness(412);
    bext.loudnessRangeLu = readLoudness(414);
    bext.maxTruePeakDbtp = readLoudness(416);
    bext.maxMomentaryLufs = readLoudness(418);
    bext.maxShortTermLufs = readLoudness(420);
  }
  return bext;
}

/** RIFF LIST/INFO sub-chunks as `INFO.<id>` text tags. INFO `ISRC` means "source", not a recording code. */
export function parseInfoList(bytes: Uint8Array, text: Record<string, string>): void {
  if (bytes.length < 4 || latin1.decode(bytes.subarray(0, 4)) !== 'INFO') return;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let position = 4;
  while (position + 8 <= bytes.length) {
    const id = latin1.decode(bytes.subarray(position, position + 4));
    const size = view.getUint32(position + 4, true);
    const value = readFixedText(bytes, position + 8, size);
    if (/^[A-Z0-9]{4}$/u.test(id) && value !== '') text[`INFO.${id}`] = value;
    position += 8 + size + (size % 2);
  }
}

/** Leaf elements of an iXML document as `iXML.<ELEMENT>` text tags (nested paths are flattened). */
export function parseIxml(bytes: Uint8Array, text: Record<string, string>): void {
  const xml = utf8.decode(bytes.subarray(0, 65_536));
  const leaf = /<([A-Za-z][\w.-]*)>([^<]{1,1000})<\/\1>/gu;
  for (const match of xml.matchAll(leaf)) {
    const name = match[1];
    const value = match[2]?.trim();
    if (name !== undefined && value) text[`iXML.${name}`] ??= value;
  }
}

function readSyncsafe(bytes: Uint8Array, at: number): number {
  return (
    ((bytes[at]! & 0x7f) << 21) |
    ((bytes[at + 1]! & 0x7f) << 14) |
    ((bytes[at + 2]! & 0x7f) << 7) |
    (bytes[at + 3]! & 0x7f)
  );
}

function decodeId3Text(frame: Uint8Array): string {
  const encoding = frame[0];
  const body = frame.subarray(1);
  let value: string;
  if (encoding === 1 || encoding === 2) {
    let littleEndian = encoding === 1;
    let start = 0;
    if (encoding === 1 && body.length >= 2) {
      if (body[0] === 0xff && body[1] === 0xfe) start = 2;
      else if (body[0] === 0xfe && body[1] === 0xff) {
        start = 2;
        littleEndian = false;
      }
    }
    value = new TextDecoder(littleEndian ? 'utf-16le' : 'utf-16be').decode(body.subarray(start));
  } else if (encoding === 3) {
    value = utf8.decode(body);
  } else {
    value = latin1.decode(body);
  }
  const nul = value.indexOf('\u0000');
  return (nul === -1 ? value : value.slice(0, nul)).trim();
}

/**
 * ID3v2.2–2.4 text frames (an `id3 `/`ID3 ` chunk in WAV or AIFF) as `ID3.<frame>` tags; the
 * TSRC frame (TRC in v2.2) is the recording's ISRC.
 */
export function parseId3(bytes: Uint8Array, tags: AudioTags): void {
  if (bytes.length < 10 || bytes[0] !== 0x49 || bytes[1] !== 0x44 || bytes[2] !== 0x33) return;
  const major = bytes[3]!;
  const flags = bytes[5]!;
  const end = Math.min(bytes.length, 10 + readSyncsafe(bytes, 6));
  let position = 10;
  if (flags & 0x40 && major >= 3) {
    const extended =
      major === 4
        ? readSyncsafe(bytes, 10)
        : new DataView(bytes.buffer, bytes.byteOffset).getUint32(10) + 4;
    position += extended;
  }
  const idLength = major === 2 ? 3 : 4;
  const headerLength = major === 2 ? 6 : 10;
  tags.text ??= {};
  const text = tags.text;
  while (position + headerLength <= end) {
    const id = latin1.decode(bytes.subarray(position, position + idLength));
    if (!/^[A-Z0-9]+$/u.test(id)) break;
    let size: number;
    if (major === 2) {
      size = (bytes[position + 3]! << 16) | (bytes[position + 4]! << 8) | bytes[position + 5]!;
    } else if (major === 4) {
      size = readSyncsafe(bytes, position + 4);
    } else {
      size =
        ((bytes[position + 4]! << 24) |
          (bytes[position + 5]! << 16) |
          (bytes[position + 6]! << 8) |
          bytes[position + 7]!) >>>
        0;
    }
    const body = bytes.subarray(
      position + headerLength,
      Math.min(end, position + headerLength + size),
    );
    if (id.startsWith('T') && id !== 'TXXX' && body.length > 1) {
      const value = decodeId3Text(body);
      if (value !== '') {
        text[`ID3.${id}`] = value;
        if (id === 'TSRC' || id === 'TRC') tags.isrc = value.replace(/[\s-]/gu, '').toUpperCase();
      }
    }
    position += headerLength + size;
  }
}
