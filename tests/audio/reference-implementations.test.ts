/**
 * Side by side with two independent implementations on the same generated files:
 * libebur128 (Debian libebur128-dev, through a C program compiled in the test) and Debian's
 * ffmpeg `ebur128` filter. Tolerances from issue 3: integrated within 0.1 LU of both; true peak
 * within 0.2 dB of libebur128 (ffmpeg's resampler-based true peak overshoots, REFERENCES §2);
 * loudness range within 1 LU (Tech 3342's tolerance) of ffmpeg, which samples short-term
 * loudness at 10 Hz as we do, and of libebur128 (1 Hz) where the signal has no abrupt edges.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeFileInThread } from '../../src/lib/audio/analyze-in-thread.ts';
import { saveWav } from './support/measure.ts';
import {
  ensureReferenceTools,
  measureWithFfmpeg,
  measureWithLibebur128,
} from './support/reference-tools.ts';
import {
  concat,
  dbToAmplitude,
  pinkNoise,
  type SampleFormat,
  silence,
  sine,
} from './support/signals.ts';

interface Case {
  name: string;
  sampleRateHz: number;
  format: SampleFormat;
  channels: () => Float64Array[];
  /** Abrupt starts/stops from silence, where 1 Hz and 10 Hz LRA sampling legitimately differ. */
  abruptEdges: boolean;
}

const cases: Case[] = [
  {
    name: 'pink noise with level steps (0 / −14 / +6 dB), 48 kHz stereo 24-bit',
    sampleRateHz: 48_000,
    format: 'int24',
    abruptEdges: false,
    channels: () => {
      const fs = 48_000;
      const l = concat(
        pinkNoise(fs, 8, -20, 1),
        pinkNoise(fs, 5, -34, 2),
        pinkNoise(fs, 6, -14, 3),
      );
      const r = concat(
        pinkNoise(fs, 8, -20, 4),
        pinkNoise(fs, 5, -34, 5),
        pinkNoise(fs, 6, -14, 6),
      );
      return [l, r];
    },
  },
  {
    name: '12 kHz sine at 0.98 then pink noise, 48 kHz stereo float',
    sampleRateHz: 48_000,
    format: 'float32',
    abruptEdges: true,
    channels: () => {
      const fs = 48_000;
      const x = concat(sine(fs, 6, 12_000, 0.98), pinkNoise(fs, 4, -20, 7));
      return [x, x];
    },
  },
  {
    name: 'silence, pink noise, silence, 96 kHz stereo 24-bit',
    sampleRateHz: 96_000,
    format: 'int24',
    abruptEdges: true,
    channels: () => {
      const fs = 96_000;
      const l = concat(silence(fs, 1.5), pinkNoise(fs, 10, -18, 8), silence(fs, 2));
      const r = concat(silence(fs, 1.5), pinkNoise(fs, 10, -18, 9), silence(fs, 2));
      return [l, r];
    },
  },
  {
    name: 'near-full-scale sines with inter-sample overs and head/tail silence, 44.1 kHz stereo 16-bit',
    sampleRateHz: 44_100,
    format: 'int16',
    abruptEdges: true,
    channels: () => {
      const fs = 44_100;
      // fs/4 at 45°: samples at ±0.919, true peak +2.3 dBTP.
      const overs = sine(fs, 4, fs / 4, 1.3, Math.PI / 4);
      const l = concat(
        silence(fs, 1),
        overs,
        sine(fs, 4, 997, 0.99),
        pinkNoise(fs, 4, -16, 10),
        silence(fs, 1),
      );
      const r = concat(
        silence(fs, 1),
        overs,
        sine(fs, 4, 3_001, 0.9),
        pinkNoise(fs, 4, -16, 11),
        silence(fs, 1),
      );
      return [l, r];
    },
  },
  {
    name: 'pink noise rising in steps, 44.1 kHz mono 16-bit',
    sampleRateHz: 44_100,
    format: 'int16',
    abruptEdges: false,
    channels: () => {
      const fs = 44_100;
      return [
        concat(pinkNoise(fs, 6, -26, 12), pinkNoise(fs, 6, -21, 13), pinkNoise(fs, 6, -16, 14)),
      ];
    },
  },
  {
    name: 'pink noise and a 1 kHz tone, 96 kHz mono float',
    sampleRateHz: 96_000,
    format: 'float32',
    abruptEdges: false,
    channels: () => {
      const fs = 96_000;
      return [
        concat(
          pinkNoise(fs, 8, -22, 15),
          sine(fs, 6, 1000, dbToAmplitude(-12)),
          pinkNoise(fs, 6, -30, 16),
        ),
      ];
    },
  },
];

let dir = '';

beforeAll(() => {
  ensureReferenceTools();
  dir = mkdtempSync(join(tmpdir(), 'quayside-reference-'));
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('agreement with libebur128 and ffmpeg ebur128', () => {
  for (const [index, c] of cases.entries()) {
    it(c.name, async () => {
      const path = saveWav(join(dir, `case-${index}.wav`), c.channels(), c.sampleRateHz, c.format);
      const ours = await analyzeFileInThread(path);
      const libebur128 = measureWithLibebur128(path);
      const ffmpeg = measureWithFfmpeg(path);
      const context = JSON.stringify({ ours: ours.loudness, libebur128, ffmpeg });
      // Integrated loudness: within 0.1 LU of both (issue 3). ffmpeg prints one decimal.
      expect(
        Math.abs(ours.loudness.integratedLufs! - libebur128.integratedLufs),
        context,
      ).toBeLessThanOrEqual(0.1);
      expect(
        Math.abs(ours.loudness.integratedLufs! - ffmpeg.integratedLufs),
        context,
      ).toBeLessThanOrEqual(0.1);
      // True peak: within 0.2 dB of libebur128 (issue 3).
      expect(
        Math.abs(ours.loudness.truePeakDbtp! - libebur128.truePeakDbtp),
        context,
      ).toBeLessThanOrEqual(0.2);
      // Sample peak: the same samples, so the same value.
      expect(
        Math.abs(ours.loudness.samplePeakDbfs! - libebur128.samplePeakDbfs),
        context,
      ).toBeLessThanOrEqual(0.001);
      // Loudness range: within 1 LU (EBU Tech 3342 tolerance).
      expect(Math.abs(ours.loudness.rangeLu! - ffmpeg.rangeLu), context).toBeLessThanOrEqual(1);
      if (!c.abruptEdges) {
        expect(Math.abs(ours.loudness.rangeLu! - libebur128.rangeLu), context).toBeLessThanOrEqual(
          1,
        );
      }
    });
  }
});
