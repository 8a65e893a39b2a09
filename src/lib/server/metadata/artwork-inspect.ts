/**
 * Checks a cover-art file before it is stored. The rules are common distributor practice
 * (issue 5): JPEG or PNG, square, at least 3000 × 3000 pixels, RGB colour.
 */
import { imageSize } from 'image-size';

export const ARTWORK_MIN_PX = 3000; // common distributor practice
export const ARTWORK_MAX_BYTES = 40 * 1024 * 1024; // common distributor practice (most cap at 10–50 MB)

export interface ArtworkFacts {
  format: 'jpeg' | 'png';
  widthPx: number;
  heightPx: number;
  /** What the file says about colour: "rgb", "grayscale", "cmyk", "rgba", or "unknown". */
  colour: string;
}

/** PNG colour type (IHDR byte 9, PNG spec §11.2.2) as one of our colour words. */
function pngColour(bytes: Uint8Array): string {
  const type = bytes[25];
  if (type === 2 || type === 3) return 'rgb';
  if (type === 6) return 'rgba';
  if (type === 0 || type === 4) return 'grayscale';
  return 'unknown';
}

/** Components of the first JPEG frame header (SOFn, ITU T.81 §B.2.2): 1 grey, 3 colour, 4 CMYK. */
function jpegColour(bytes: Uint8Array): string {
  let i = 2;
  while (i + 9 < bytes.length) {
    if (bytes[i] !== 0xff) {
      i += 1;
      continue;
    }
    const marker = bytes[i + 1]!;
    if (marker === 0xff) {
      i += 1;
      continue;
    }
    const length = (bytes[i + 2]! << 8) | bytes[i + 3]!;
    const isFrame =
      marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc;
    if (isFrame) {
      const components = bytes[i + 9];
      return components === 3
        ? 'rgb'
        : components === 1
          ? 'grayscale'
          : components === 4
            ? 'cmyk'
            : 'unknown';
    }
    if (marker === 0xd8 || (marker >= 0xd0 && marker <= 0xd7)) i += 2;
    else i += 2 + length;
  }
  return 'unknown';
}

/** The facts of an artwork file, or one plain sentence saying what is wrong with it. */
export function inspectArtwork(
  bytes: Uint8Array,
): { ok: true; facts: ArtworkFacts } | { ok: false; message: string } {
  let size: ReturnType<typeof imageSize>;
  try {
    size = imageSize(bytes);
  } catch {
    return { ok: false, message: 'This file is not an image we can read; upload a JPEG or PNG.' };
  }
  const format = size.type === 'jpg' ? 'jpeg' : size.type === 'png' ? 'png' : null;
  if (!format) {
    return {
      ok: false,
      message: `Cover art must be a JPEG or PNG; this file is ${size.type?.toUpperCase() ?? 'another format'}.`,
    };
  }
  const widthPx = size.width;
  const heightPx = size.height;
  if (widthPx !== heightPx) {
    return {
      ok: false,
      message: `Cover art must be square; this image is ${widthPx} × ${heightPx} pixels.`,
    };
  }
  if (widthPx < ARTWORK_MIN_PX) {
    return {
      ok: false,
      message: `Cover art must be at least ${ARTWORK_MIN_PX} × ${ARTWORK_MIN_PX} pixels; this image is ${widthPx} × ${heightPx}.`,
    };
  }
  const colour = format === 'png' ? pngColour(bytes) : jpegColour(bytes);
  if (colour !== 'rgb') {
    const said =
      colour === 'rgba'
        ? 'has a transparency channel'
        : colour === 'unknown'
          ? 'has a colour mode we cannot read'
          : `is ${colour === 'cmyk' ? 'CMYK' : 'greyscale'}`;
    return {
      ok: false,
      message: `Cover art must be RGB colour; this image ${said}. Save it as RGB and upload again.`,
    };
  }
  return { ok: true, facts: { format, widthPx, heightPx, colour } };
}
