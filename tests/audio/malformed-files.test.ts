/**
 * Malformed input never crashes, hangs or allocates without bound: each file in a generated
 * corpus gives its typed error (or, where the damage is harmless, a measurement), and
 * fast-check runs of random damage to valid WAV, AIFF, AIFF-C and RF64 files do the same
 * (thousands of cases by default; `npm run fuzz` runs many more).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  analyzeFileInThread,
  analyzeStreamInThread,
} from '../../src/lib/audio/analyze-in-thread.ts';
import { AudioAnalysisError, type AudioErrorCode } from '../../src/lib/audio/errors.ts';
import { fuzzTimeout, runFuzz } from '../support/fuzz.ts';
import { runFfmpeg } from './support/reference-tools.ts';
import { chunk, createRandom, sine, toReadable, writeAiff, writeWav } from './support/signals.ts';

let dir = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'quayside-malformed-'));
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

const fs = 48_000;
const tone = sine(fs, 0.25, 1000, 0.5);
const valid = (): Buffer => writeWav([tone, tone], fs, { format: 'int16' });
// Offsets in a canonical 44-byte header: fmt body starts at 20, data size at 40.
const FMT = 20;

function withTimeout<T>(promise: Promise<T>, ms: number): Promise<T> {
  return Promise.race([
    promise,
    new Promise<T>((_, reject) =>
      setTimeout(() => reject(new Error(`no answer within ${ms} ms (hang?)`)), ms),
    ),
  ]);
}

async function outcome(bytes: Uint8Array, name = 'case.wav'): Promise<AudioErrorCode | 'ok'> {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  try {
    await withTimeout(analyzeFileInThread(path), 10_000);
    return 'ok';
  } catch (error) {
    if (error instanceof AudioAnalysisError) {
      expect(error.message.length).toBeGreaterThan(10);
      return error.code;
    }
    throw error;
  }
}

const corpus: { name: string; make: () => Uint8Array; expected: AudioErrorCode | 'ok' }[] = [
  { name: 'empty file', make: () => new Uint8Array(0), expected: 'empty-file' },
  {
    name: 'random bytes named .wav',
    make: () => {
      const random = createRandom(7);
      return Uint8Array.from({ length: 4096 }, () => Math.floor(random() * 256));
    },
    expected: 'not-audio',
  },
  {
    name: 'text named .wav',
    make: () => Buffer.from('Hello, this is not audio at all.\n'.repeat(40)),
    expected: 'not-audio',
  },
  { name: 'only "RIFF"', make: () => Buffer.from('RIFF'), expected: 'truncated' },
  {
    name: 'header only, data cut off',
    make: () => valid().subarray(0, 44 + 1000),
    expected: 'truncated',
  },
  {
    name: 'data size larger than the file',
    make: () => {
      const b = valid();
      b.writeUInt32LE(0x7fff0000, 40);
      return b;
    },
    expected: 'truncated',
  },
  {
    name: 'RIFF size larger than the file (harmless)',
    make: () => {
      const b = valid();
      b.writeUInt32LE(0x7fff0000, 4);
      return b;
    },
    expected: 'ok',
  },
  {
    name: 'zero channels',
    make: () => {
      const b = valid();
      b.writeUInt16LE(0, FMT + 2);
      return b;
    },
    expected: 'zero-channels',
  },
  {
    name: 'sample rate 0 Hz',
    make: () => {
      const b = valid();
      b.writeUInt32LE(0, FMT + 4);
      return b;
    },
    expected: 'absurd-sample-rate',
  },
  {
    name: 'sample rate 4 GHz',
    make: () => {
      const b = valid();
      b.writeUInt32LE(4_000_000_000, FMT + 4);
      return b;
    },
    expected: 'absurd-sample-rate',
  },
  {
    name: 'block size disagreeing with channels × sample size',
    make: () => {
      const b = valid();
      b.writeUInt16LE(7, FMT + 12);
      return b;
    },
    expected: 'bad-header',
  },
  {
    name: '20 bits per sample (3-byte samples) with a 16-bit block size',
    make: () => {
      const b = valid();
      b.writeUInt16LE(20, FMT + 14);
      return b;
    },
    expected: 'bad-header',
  },
  {
    name: 'MP3 format tag in a WAV',
    make: () => {
      const b = valid();
      b.writeUInt16LE(0x55, FMT);
      return b;
    },
    expected: 'unsupported-format',
  },
  {
    name: 'fmt chunk too short',
    make: () =>
      Buffer.concat([
        Buffer.from('RIFF\x20\x00\x00\x00WAVE', 'latin1'),
        chunk('fmt ', Buffer.alloc(8)),
        chunk('data', Buffer.alloc(16)),
      ]),
    expected: 'bad-header',
  },
  {
    name: 'no data chunk',
    make: () => valid().subarray(0, 36),
    expected: 'no-audio-data',
  },
  {
    name: 'odd-sized chunk with its pad byte',
    make: () =>
      writeWav([tone], fs, { chunksBefore: [{ id: 'LIST', body: Buffer.from('INFOabc') }] }),
    expected: 'ok',
  },
  {
    name: 'odd-sized chunk without its pad byte',
    make: () => {
      const fmtBody = valid().subarray(FMT, FMT + 16);
      const odd = Buffer.concat([
        Buffer.from('junk', 'latin1'),
        Buffer.from([3, 0, 0, 0]),
        Buffer.from('abc'),
      ]);
      const data = chunk('data', Buffer.alloc(4800));
      const body = Buffer.concat([
        Buffer.from('WAVE', 'latin1'),
        chunk('fmt ', fmtBody),
        odd,
        data,
      ]);
      const head = Buffer.alloc(8);
      head.write('RIFF', 0, 'latin1');
      head.writeUInt32LE(body.length, 4);
      return Buffer.concat([head, body]);
    },
    expected: 'ok',
  },
  {
    name: 'AIFF whose COMM frame count exceeds its sound data',
    make: () => {
      const b = writeAiff([tone], fs);
      b.writeUInt32BE(10_000_000, 12 + 8 + 2);
      return b;
    },
    expected: 'truncated',
  },
  {
    name: 'AIFF-C with a compressed codec',
    make: () => {
      const b = writeAiff([tone], fs, { compression: 'sowt' });
      b.write('ulaw', 12 + 8 + 18, 'latin1');
      return b;
    },
    expected: 'unsupported-format',
  },
];

describe('malformed-file corpus', () => {
  for (const c of corpus) {
    it(`${c.name} → ${c.expected}`, async () => {
      expect(await outcome(c.make())).toBe(c.expected);
    });
  }

  it('a truncated stream (shorter than its header says, size unknown) → truncated', async () => {
    const bytes = valid().subarray(0, 44 + 2000);
    await expect(analyzeStreamInThread(toReadable(bytes, 100), null)).rejects.toMatchObject({
      code: 'truncated',
    });
  });

  it('FLAC and MP3 are named and refused (identified by music-metadata)', async () => {
    const wavPath = join(dir, 'source.wav');
    writeFileSync(wavPath, valid());
    runFfmpeg(['-i', wavPath, join(dir, 'source.flac')]);
    runFfmpeg(['-i', wavPath, '-c:a', 'libmp3lame', join(dir, 'source.mp3')]);
    for (const [file, format] of [
      ['source.flac', 'flac'],
      ['source.mp3', 'mpeg'],
    ] as const) {
      const error = await analyzeFileInThread(join(dir, file)).catch((e: unknown) => e);
      expect(error).toBeInstanceOf(AudioAnalysisError);
      expect((error as AudioAnalysisError).code).toBe('unsupported-format');
      expect((error as AudioAnalysisError).format?.toLowerCase()).toContain(format);
      expect((error as AudioAnalysisError).message.toLowerCase()).toContain(format);
    }
  });
});

/** Measures the damaged bytes from a file and from a stream; both must end the same way. */
async function expectFileAndStreamAgree(damaged: Uint8Array): Promise<void> {
  const result = await outcome(damaged, 'fuzz.wav');
  expect(typeof result).toBe('string');
  const streamed = await withTimeout(
    analyzeStreamInThread(toReadable(damaged, 997), damaged.length).then(
      () => 'ok' as const,
      (error: unknown) =>
        error instanceof AudioAnalysisError ? error.code : Promise.reject(error),
    ),
    10_000,
  );
  expect(streamed).toBe(result);
}

// Counts and seed come from tests/support/fuzz.ts: FUZZ_RUNS scales them for `npm run fuzz`.
describe('fuzzing damaged files (fast-check, bounded)', () => {
  it(
    'every damaged WAV either measures or gives a typed error, within a time limit',
    async () => {
      const base = writeWav([tone.subarray(0, 2400), tone.subarray(0, 2400)], fs, {
        format: 'int24',
        chunksBefore: [{ id: 'LIST', body: Buffer.from('INFOINAM\x05\x00\x00\x00Tide\x00\x00') }],
      });
      const damage = fc.record({
        writes: fc.array(
          fc.record({ at: fc.nat({ max: 120 }), value: fc.integer({ min: 0, max: 255 }) }),
          { maxLength: 8 },
        ),
        words: fc.array(fc.record({ at: fc.nat({ max: 116 }), value: fc.nat() }), {
          maxLength: 3,
        }),
        cut: fc.option(fc.nat({ max: base.length }), { nil: undefined }),
      });
      await runFuzz(
        'audio: damaged WAV',
        fc.asyncProperty(damage, async ({ writes, words, cut }) => {
          const bytes = Buffer.from(base);
          for (const w of writes) bytes[w.at] = w.value;
          for (const w of words) bytes.writeUInt32LE(w.value >>> 0, w.at);
          await expectFileAndStreamAgree(cut === undefined ? bytes : bytes.subarray(0, cut));
        }),
        1500,
      );
    },
    fuzzTimeout(120_000),
  );

  it(
    'every damaged AIFF, AIFF-C, RF64 or extensible WAV does the same',
    async () => {
      const short = tone.subarray(0, 1200);
      const bases = [
        writeAiff([short, short], fs, { bits: 24 }),
        writeAiff([short], fs, { compression: 'sowt' }),
        writeAiff([short, short], fs, { compression: 'fl32' }),
        writeWav([short, short], fs, { format: 'int16', rf64: true }),
        writeWav([short, short], fs, { format: 'float32', extensibleMask: 0x3 }),
      ];
      const damage = fc.record({
        base: fc.nat({ max: bases.length - 1 }),
        writes: fc.array(
          fc.record({ at: fc.nat({ max: 100 }), value: fc.integer({ min: 0, max: 255 }) }),
          { maxLength: 8 },
        ),
        words: fc.array(
          fc.record({ at: fc.nat({ max: 96 }), value: fc.nat(), bigEndian: fc.boolean() }),
          { maxLength: 3 },
        ),
        cut: fc.option(fc.double({ min: 0, max: 1, noNaN: true }), { nil: undefined }),
      });
      await runFuzz(
        'audio: damaged AIFF/AIFF-C/RF64/extensible',
        fc.asyncProperty(damage, async ({ base, writes, words, cut }) => {
          const bytes = Buffer.from(bases[base]!);
          for (const w of writes) bytes[w.at] = w.value;
          for (const w of words) {
            if (w.bigEndian) bytes.writeUInt32BE(w.value >>> 0, w.at);
            else bytes.writeUInt32LE(w.value >>> 0, w.at);
          }
          const damaged =
            cut === undefined ? bytes : bytes.subarray(0, Math.floor(cut * bytes.length));
          await expectFileAndStreamAgree(damaged);
        }),
        2000,
      );
    },
    fuzzTimeout(120_000),
  );
});
