/** Tiny image writers for tests: real PNG files and JPEG headers, no image library needed. */
import { deflateSync } from 'node:zlib';

const crcTable = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k += 1) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(bytes: Buffer): number {
  let c = 0xffffffff;
  for (const b of bytes) c = crcTable[(c ^ b) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

/** A valid PNG of one flat colour. colourType: 0 grey, 2 RGB, 6 RGBA (PNG spec §11.2.2). */
export function makePng(width: number, height: number, colourType: 0 | 2 | 6 = 2): Buffer {
  const channels = colourType === 0 ? 1 : colourType === 2 ? 3 : 4;
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8;
  ihdr[9] = colourType;
  const row = Buffer.alloc(1 + width * channels, 0x40);
  row[0] = 0; // filter type None
  const raw = Buffer.concat(Array.from({ length: height }, () => row));
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/** SOI + a baseline frame header (ITU T.81 §B.2.2) + EOI: enough for size and colour checks. */
export function makeJpegHeader(width: number, height: number, components: 1 | 3 | 4): Buffer {
  const sof = [
    0xff,
    0xc0,
    0x00,
    8 + components * 3,
    8,
    height >> 8,
    height & 0xff,
    width >> 8,
    width & 0xff,
    components,
  ];
  for (let i = 0; i < components; i += 1) sof.push(i + 1, 0x11, 0);
  return Buffer.from([
    0xff,
    0xd8,
    0xff,
    0xe0,
    0x00,
    0x10,
    0x4a,
    0x46,
    0x49,
    0x46,
    0x00,
    0x01,
    0x01,
    0x00,
    0x00,
    0x01,
    0x00,
    0x01,
    0x00,
    0x00,
    ...sof,
    0xff,
    0xd9,
  ]);
}
