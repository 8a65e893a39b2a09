/**
 * Front covers for the demo releases, drawn here so the demo holds no image from elsewhere: a
 * dusk sky, a low sun, a hill with a signal mast, and a few bands of water below. Written as
 * an RGB PNG (PNG specification, W3C 2003: IHDR, one IDAT, IEND; filter type None).
 */
import { crc32, deflateSync } from 'node:zlib';

export interface CoverColours {
  skyTop: [number, number, number];
  skyHorizon: [number, number, number];
  sun: [number, number, number];
  land: [number, number, number];
  water: [number, number, number];
}

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

const mix = (a: number, b: number, t: number) => Math.round(a + (b - a) * t);

/** A square cover of `size` pixels in the given colours. */
export function coverArtPng(size: number, colours: CoverColours): Buffer {
  const stride = 1 + size * 3;
  const raw = Buffer.alloc(stride * size);
  const horizon = Math.round(size * 0.68);
  const sun = { x: size * 0.7, y: size * 0.56, r: size * 0.09 };
  const mastX = size * 0.36;
  const hillTop = (x: number) =>
    horizon - size * 0.16 * Math.exp(-(((x - mastX) / (size * 0.22)) ** 2));
  for (let y = 0; y < size; y += 1) {
    const row = y * stride;
    raw[row] = 0; // filter type None
    for (let x = 0; x < size; x += 1) {
      let colour: [number, number, number];
      if (y >= horizon) {
        // Water: the sky's glow fading with depth, crossed by thin light ripples.
        const depth = (y - horizon) / (size - horizon);
        const ripple = (y - horizon) % Math.round(size * 0.035) < size * 0.004;
        const glow = (ripple ? 0.45 : 0.3) * (1 - depth) ** 2;
        colour = [0, 1, 2].map((i) => mix(colours.water[i]!, colours.skyHorizon[i]!, glow)) as [
          number,
          number,
          number,
        ];
      } else if (
        y >= hillTop(x) ||
        (Math.abs(x - mastX) < size * 0.004 && y > hillTop(mastX) - size * 0.12)
      ) {
        colour = colours.land;
      } else if ((x - sun.x) ** 2 + (y - sun.y) ** 2 < sun.r ** 2) {
        colour = colours.sun;
      } else {
        const t = y / horizon;
        colour = [0, 1, 2].map((i) => mix(colours.skyTop[i]!, colours.skyHorizon[i]!, t)) as [
          number,
          number,
          number,
        ];
      }
      const at = row + 1 + x * 3;
      raw[at] = colour[0];
      raw[at + 1] = colour[1];
      raw[at + 2] = colour[2];
    }
  }
  const header = Buffer.alloc(13);
  header.writeUInt32BE(size, 0);
  header.writeUInt32BE(size, 4);
  header[8] = 8; // bits per channel
  header[9] = 2; // truecolour
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}
