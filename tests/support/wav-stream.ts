/**
 * Writes a PCM WAV file chunk by chunk from a sample function, so test masters of several
 * minutes never sit in memory whole. Integer PCM, little-endian (RIFF/WAVE, canonical
 * 44-byte header with a plain `fmt ` chunk).
 */
import { open } from 'node:fs/promises';
import { pcmWavHeader } from '@/lib/audio/wav-header';

export interface WavSpec {
  sampleRateHz: number;
  bitsPerSample: 16 | 24;
  channels: number;
  frames: number;
  /** Sample value in −1…1 for frame `i` of channel `ch`. */
  sample: (i: number, ch: number) => number;
  /** Content resolution: 16 keeps a 24-bit file's low 8 bits zero (padded 16-bit audio). */
  contentBits?: number;
}

export async function writeWavFile(path: string, spec: WavSpec): Promise<number> {
  const bytesPerSample = spec.bitsPerSample / 8;
  const dataBytes = spec.frames * spec.channels * bytesPerSample;
  const header = pcmWavHeader({
    sampleRateHz: spec.sampleRateHz,
    bits: spec.bitsPerSample,
    channels: spec.channels,
    dataBytes,
  });

  const contentBits = spec.contentBits ?? spec.bitsPerSample;
  const fullScale = 2 ** (contentBits - 1) - 1;
  const shift = 2 ** (spec.bitsPerSample - contentBits);
  const file = await open(path, 'w');
  try {
    await file.write(header);
    const framesPerChunk = 65_536;
    const chunk = Buffer.alloc(framesPerChunk * spec.channels * bytesPerSample);
    for (let start = 0; start < spec.frames; start += framesPerChunk) {
      const count = Math.min(framesPerChunk, spec.frames - start);
      let offset = 0;
      for (let i = start; i < start + count; i++) {
        for (let ch = 0; ch < spec.channels; ch++) {
          const value =
            Math.round(Math.max(-1, Math.min(1, spec.sample(i, ch))) * fullScale) * shift;
          if (bytesPerSample === 2) chunk.writeInt16LE(value, offset);
          else chunk.writeIntLE(value, offset, 3);
          offset += bytesPerSample;
        }
      }
      await file.write(chunk, 0, offset);
    }
  } finally {
    await file.close();
  }
  return 44 + dataBytes;
}
