import { describe, expect, it } from 'vitest';
import { inspectArtwork } from '@/lib/server/metadata/artwork-inspect';
import { makeJpegHeader, makePng } from './images';

describe('inspectArtwork (JPEG or PNG, square, ≥ 3000 px, RGB: common distributor practice)', () => {
  it('accepts a 3000 × 3000 RGB PNG and an RGB JPEG', () => {
    expect(inspectArtwork(makePng(3000, 3000, 2))).toEqual({
      ok: true,
      facts: { format: 'png', widthPx: 3000, heightPx: 3000, colour: 'rgb' },
    });
    expect(inspectArtwork(makeJpegHeader(3200, 3200, 3))).toMatchObject({
      ok: true,
      facts: { format: 'jpeg', widthPx: 3200 },
    });
  });

  it.each([
    [makePng(2999, 2999), 'at least 3000 × 3000 pixels; this image is 2999 × 2999'],
    [makePng(3000, 2000), 'must be square; this image is 3000 × 2000 pixels'],
    [makePng(3000, 3000, 0), 'this image is greyscale'],
    [makePng(3000, 3000, 6), 'has a transparency channel'],
    [makeJpegHeader(3000, 3000, 4), 'this image is CMYK'],
    [makeJpegHeader(3000, 3000, 1), 'this image is greyscale'],
    [
      Buffer.from('GIF89a\x01\x00\x01\x00\x00\x00\x00;', 'latin1'),
      'must be a JPEG or PNG; this file is GIF',
    ],
    [Buffer.from('not an image at all'), 'not an image we can read'],
  ])('refuses with a plain reason (%#)', (bytes, reason) => {
    const result = inspectArtwork(bytes);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.message).toContain(reason);
  });
});
