/**
 * Measurements against signals whose answers can be computed by hand, and the readers'
 * formats and tags. Each expectation says how the expected value follows from the signal.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import wavefile from 'wavefile';
import {
  analyzeFileInThread,
  analyzeStreamInThread,
} from '../../src/lib/audio/analyze-in-thread.ts';
import { measureChannels } from './support/measure.ts';
import {
  chunk,
  concat,
  createRandom,
  pinkNoise,
  silence,
  sine,
  toReadable,
  writeAiff,
  writeWav,
} from './support/signals.ts';

const { WaveFile } = wavefile;
let dir = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'quayside-measure-'));
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function save(name: string, bytes: Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
}

describe('levels', () => {
  it('sample peak: one sample at 0.5 reads 20·log10(0.5) = −6.0206 dBFS', async () => {
    const x = new Float64Array(48_000);
    x[1000] = 0.25;
    x[20_000] = -0.5;
    const m = await measureChannels([x], 48_000);
    expect(m.channels[0]!.samplePeakDbfs).toBeCloseTo(20 * Math.log10(0.5), 6);
    expect(m.loudness.samplePeakDbfs).toBeCloseTo(-6.0206, 4);
  });

  it('DC offset: alternating +0.3 / −0.1 has a mean of +0.1', async () => {
    const x = new Float64Array(44_100).map((_, i) => (i % 2 === 0 ? 0.3 : -0.1));
    const m = await measureChannels([x, x.map((v) => -v)], 44_100, { format: 'float64' });
    expect(m.channels[0]!.dcOffset).toBeCloseTo(0.1, 6); // float32 decoding of 0.3
    expect(m.channels[1]!.dcOffset).toBeCloseTo(-0.1, 6);
  });

  it('digital silence has null levels, not magic numbers', async () => {
    const m = await measureChannels([silence(48_000, 2), silence(48_000, 2)], 48_000, {
      format: 'int16',
    });
    expect(m.loudness.integratedLufs).toBeNull();
    expect(m.loudness.rangeLu).toBeNull();
    expect(m.loudness.maxMomentaryLufs).toBeNull();
    expect(m.loudness.truePeakDbtp).toBeNull();
    expect(m.channels[0]!.samplePeakDbfs).toBeNull();
    expect(m.channels[0]!.effectiveBitDepth).toBe(0);
    expect(m.series.loudness.shortTermLufs.every((v) => v === null)).toBe(true);
    expect(JSON.parse(JSON.stringify(m))).toEqual(m);
  });

  it('an empty data chunk gives a result with zero duration and null levels', async () => {
    const m = await measureChannels([new Float64Array(0), new Float64Array(0)], 48_000);
    expect(m.format.durationSamples).toBe(0);
    expect(m.loudness.integratedLufs).toBeNull();
    expect(m.channels[0]!.firstSampleDbfs).toBeNull();
    expect(m.series.waveform.min).toEqual([]);
  });

  it('first and last sample levels: a file starting at 0.5 and ending at 0', async () => {
    const x = concat(new Float64Array([0.5]), sine(48_000, 1, 440, 0.1), new Float64Array([0]));
    const m = await measureChannels([x], 48_000);
    expect(m.channels[0]!.firstSampleDbfs).toBeCloseTo(-6.0206, 4);
    expect(m.channels[0]!.lastSampleDbfs).toBeNull();
  });
});

describe('silence at head and tail', () => {
  // A ±0.1 square wave (−20 dBFS) between exact lengths of digital silence.
  const fs = 48_000;
  const square = new Float64Array(2 * fs).map((_, i) =>
    Math.floor(i / 24) % 2 === 0 ? 0.1 : -0.1,
  );
  const signal = concat(silence(fs, 1), square, silence(fs, 0.5));

  it('is 1.000 s at the head and 0.500 s at the tail at the default −60 dBFS', async () => {
    const m = await measureChannels([signal, signal], fs);
    expect(m.silence.thresholdDbfs).toBe(-60);
    expect(m.silence.headSeconds).toBeCloseTo(1, 9);
    expect(m.silence.tailSeconds).toBeCloseTo(0.5, 9);
  });

  it('follows the configured threshold: at −10 dBFS the whole file is silent', async () => {
    const m = await measureChannels([signal], fs, { silenceThresholdDbfs: -10 });
    expect(m.silence.headSeconds).toBeCloseTo(3.5, 9);
    expect(m.silence.tailSeconds).toBeCloseTo(3.5, 9);
  });

  it('counts a sample as loud when any channel is above the threshold', async () => {
    const right = concat(silence(fs, 0.25), new Float64Array(fs * 3.25).fill(0.01));
    const m = await measureChannels([signal, right], fs);
    expect(m.silence.headSeconds).toBeCloseTo(0.25, 9);
    expect(m.silence.tailSeconds).toBeCloseTo(0, 9);
  });
});

describe('effective bit depth (files written with wavefile)', () => {
  const random = createRandom(42);
  const frames = 4_800;

  it('reports 16 for a 16-bit file', async () => {
    const wav = new WaveFile();
    wav.fromScratch(
      1,
      48_000,
      '16',
      Array.from({ length: frames }, () => Math.round((random() - 0.5) * 20_000)),
    );
    const m = await analyzeFileInThread(save('wavefile-16.wav', wav.toBuffer()));
    expect(m.format.bitsPerSample).toBe(16);
    expect(m.channels[0]!.effectiveBitDepth).toBe(16);
  });

  it('reports 24 for a 24-bit file with 24-bit content', async () => {
    const wav = new WaveFile();
    wav.fromScratch(
      1,
      48_000,
      '24',
      Array.from({ length: frames }, () => Math.round((random() - 0.5) * 4_000_000)),
    );
    const m = await analyzeFileInThread(save('wavefile-24.wav', wav.toBuffer()));
    expect(m.format.bitsPerSample).toBe(24);
    expect(m.channels[0]!.effectiveBitDepth).toBe(24);
  });

  it('reports 16 for a 24-bit file whose low 8 bits are always zero', async () => {
    const wav = new WaveFile();
    const codes = Array.from({ length: frames }, () => Math.round((random() - 0.5) * 20_000) * 256);
    wav.fromScratch(2, 48_000, '24', [codes, codes.map((v) => -v)]);
    const m = await analyzeFileInThread(save('wavefile-16-in-24.wav', wav.toBuffer()));
    expect(m.format.bitsPerSample).toBe(24);
    expect(m.channels.map((c) => c.effectiveBitDepth)).toEqual([16, 16]);
  });

  it('reports 16 for float samples on the 16-bit grid and 32 for arbitrary floats', async () => {
    const grid = new Float64Array(frames).map(() => Math.round((random() - 0.5) * 20_000) / 32_768);
    const free = new Float64Array(frames).map(() => (random() - 0.5) * 0.7);
    const m = await measureChannels([grid, free], 48_000, { format: 'float32' });
    expect(m.channels.map((c) => c.effectiveBitDepth)).toEqual([16, 32]);
  });
});

describe('clipping', () => {
  it('counts runs of ≥ 3 samples at full scale (or one LSB below) with their positions', async () => {
    const fs = 44_100;
    const x = sine(fs, 3, 100, 0.5);
    for (let i = 0; i < 5; i++) x[fs + i] = 1; // 5 samples at +full scale at 1.000 s
    for (let i = 0; i < 2; i++) x[2 * fs + i] = 1; // 2 samples: too short to count
    for (let i = 0; i < 4; i++) x[Math.round(2.5 * fs) + i] = -1; // 4 samples at −full scale at 2.5 s
    const m = await measureChannels([x], fs, { format: 'int16' });
    const clip = m.channels[0]!.clipping;
    expect(clip.minRunSamples).toBe(3);
    expect(clip.runCount).toBe(2);
    expect(clip.longestRunSamples).toBe(5);
    expect(clip.runs).toEqual([
      { atSeconds: 1, lengthSamples: 5 },
      { atSeconds: Math.round(2.5 * fs) / fs, lengthSamples: 4 },
    ]);
  });

  it('joins a run that crosses a read block into one', async () => {
    const fs = 48_000;
    const x = sine(fs, 2, 50, 0.3);
    for (let i = 16_380; i < 16_400; i++) x[i] = 1;
    const m = await measureChannels([x], fs, { format: 'int24' });
    expect(m.channels[0]!.clipping.runs).toEqual([{ atSeconds: 16_380 / fs, lengthSamples: 20 }]);
  });
});

describe('correlation and channel relations', () => {
  const fs = 48_000;
  const noise = pinkNoise(fs, 4, -20, 3);

  it('identical channels: correlation +1, identical flag', async () => {
    const m = await measureChannels([noise, noise], fs);
    expect(m.correlation.fullBand).toBeCloseTo(1, 9);
    expect(m.correlation.identicalChannels).toBe(true);
    expect(m.correlation.invertedChannels).toBe(false);
  });

  it('polarity-inverted channels: correlation −1, inverted flag', async () => {
    const m = await measureChannels([noise, noise.map((v) => -v)], fs);
    expect(m.correlation.fullBand).toBeCloseTo(-1, 9);
    expect(m.correlation.lowBand).toBeCloseTo(-1, 6);
    expect(m.correlation.invertedChannels).toBe(true);
  });

  it('low band: in-phase 50 Hz under anti-phase highs reads +1 below 150 Hz', async () => {
    const bass = sine(fs, 4, 50, 0.3);
    const highs = sine(fs, 4, 3_000, 0.3);
    const m = await measureChannels(
      [bass.map((v, i) => v + highs[i]!), bass.map((v, i) => v - highs[i]!)],
      fs,
    );
    expect(m.correlation.lowBandHz).toBe(150);
    expect(m.correlation.fullBand!).toBeCloseTo(0, 1);
    expect(m.correlation.lowBand!).toBeGreaterThan(0.99);
  });

  it('mono has no correlation', async () => {
    const m = await measureChannels([noise], fs);
    expect(m.correlation.fullBand).toBeNull();
    expect(m.correlation.identicalChannels).toBe(false);
  });
});

describe('durations', () => {
  it('counts CD frames of 588 samples at 44.1 kHz with the remainder (Red Book: 75 per second)', async () => {
    const m = await measureChannels([new Float64Array(588 * 100 + 7).fill(0.1)], 44_100, {
      format: 'int16',
    });
    expect(m.cdFrames).toEqual({ frames: 100, remainderSamples: 7 });
    expect(m.format.durationSamples).toBe(58_807);
  });

  it('gives a waveform overview of about 2000 points and a short-term series', async () => {
    const m = await measureChannels([pinkNoise(48_000, 10, -20, 5)], 48_000);
    expect(m.series.waveform.min.length).toBeLessThanOrEqual(2000);
    expect(m.series.waveform.min.length).toBeGreaterThan(1900);
    expect(m.series.waveform.max.every((v, i) => v >= m.series.waveform.min[i]!)).toBe(true);
    expect(m.series.loudness.stepSeconds).toBe(0.1);
    expect(m.series.loudness.shortTermLufs.length).toBe(100);
  });
});

describe('containers', () => {
  const fs = 48_000;
  const left = concat(sine(fs, 2, 997, 0.5), pinkNoise(fs, 2, -18, 21));
  const right = concat(sine(fs, 2, 1_499, 0.4), pinkNoise(fs, 2, -20, 22));

  async function reference(): Promise<number> {
    const m = await analyzeFileInThread(
      save('reference-24.wav', writeWav([left, right], fs, { format: 'int24' })),
    );
    return m.loudness.integratedLufs!;
  }

  it('reads WAV 16/24/32-bit integer and 32/64-bit float alike', async () => {
    const expected = await reference();
    for (const format of ['int16', 'int24', 'int32', 'float32', 'float64'] as const) {
      const m = await analyzeFileInThread(
        save(`format-${format}.wav`, writeWav([left, right], fs, { format })),
      );
      expect(m.format.container).toBe('wav');
      expect(Math.abs(m.loudness.integratedLufs! - expected)).toBeLessThan(0.01);
    }
  });

  it('reads WAVE_FORMAT_EXTENSIBLE and RF64', async () => {
    const expected = await reference();
    const extensible = await analyzeFileInThread(
      save('extensible.wav', writeWav([left, right], fs, { format: 'int24', extensibleMask: 0x3 })),
    );
    expect(extensible.loudness.integratedLufs!).toBeCloseTo(expected, 6);
    const rf64 = await analyzeFileInThread(
      save('rf64.wav', writeWav([left, right], fs, { format: 'int24', rf64: true })),
    );
    expect(rf64.format.container).toBe('rf64');
    expect(rf64.loudness.integratedLufs!).toBeCloseTo(expected, 6);
    expect(rf64.format.durationSamples).toBe(left.length);
  });

  it('weights an LFE channel 0 (BS.1770-4) when the extensible mask says 5.1', async () => {
    const zero = new Float64Array(left.length);
    const withLfe = await analyzeFileInThread(
      save(
        'lfe.wav',
        writeWav([left, right, zero, pinkNoise(fs, 4, -6, 30), zero, zero], fs, {
          format: 'int24',
          extensibleMask: 0x3f,
        }),
      ),
    );
    expect(withLfe.loudness.integratedLufs!).toBeCloseTo(await reference(), 2);
  });

  it('reads AIFF (16, 24-bit) and AIFF-C (sowt, fl32) alike', async () => {
    const expected = await reference();
    const variants = [
      {
        name: 'aiff-16.aiff',
        bytes: writeAiff([left, right], fs, { bits: 16 }),
        container: 'aiff',
      },
      {
        name: 'aiff-24.aiff',
        bytes: writeAiff([left, right], fs, { bits: 24 }),
        container: 'aiff',
      },
      {
        name: 'aifc-sowt.aifc',
        bytes: writeAiff([left, right], fs, { bits: 16, compression: 'sowt' }),
        container: 'aifc',
      },
      {
        name: 'aifc-fl32.aifc',
        bytes: writeAiff([left, right], fs, { compression: 'fl32' }),
        container: 'aifc',
      },
    ];
    for (const v of variants) {
      const m = await analyzeFileInThread(save(v.name, v.bytes));
      expect(m.format.container).toBe(v.container);
      expect(m.format.sampleRateHz).toBe(fs);
      expect(Math.abs(m.loudness.integratedLufs! - expected)).toBeLessThan(0.01);
    }
  });

  it('gives the same result from a stream as from the file', async () => {
    const bytes = writeWav([left, right], fs, { format: 'int24' });
    const fromFile = await analyzeFileInThread(save('stream.wav', bytes));
    const fromStream = await analyzeStreamInThread(
      toReadable(readFileSync(join(dir, 'stream.wav')), 4_099),
      bytes.length,
    );
    expect(fromStream).toEqual(fromFile);
  });
});

describe('tags', () => {
  function bext(description: string, loudness: number): Uint8Array {
    const history = 'A=PCM,F=48000,W=24,M=stereo\r\n';
    const body = Buffer.alloc(602 + history.length);
    body.write(description, 0, 'latin1');
    body.write('Quayside test', 256, 'latin1');
    body.write('2026-01-02', 320, 'latin1');
    body.write('10:11:12', 330, 'latin1');
    body.writeUInt32LE(48_000 * 3600, 338);
    body.writeUInt16LE(2, 346);
    body.writeInt16LE(Math.round(loudness * 100), 412);
    body.writeInt16LE(0x7fff, 414);
    body.write(history, 602, 'latin1');
    return body;
  }

  function id3WithTsrc(isrc: string): Uint8Array {
    // ID3v2.3: header, then one TSRC text frame (ISO-8859-1).
    const text = Buffer.concat([Buffer.from([0]), Buffer.from(isrc, 'latin1')]);
    const frame = Buffer.alloc(10);
    frame.write('TSRC', 0, 'latin1');
    frame.writeUInt32BE(text.length, 4);
    const frames = Buffer.concat([frame, text]);
    const header = Buffer.from([0x49, 0x44, 0x33, 3, 0, 0, 0, 0, 0, 0]);
    header[9] = frames.length & 0x7f;
    header[8] = (frames.length >> 7) & 0x7f;
    return Buffer.concat([header, frames]);
  }

  function infoList(entries: Record<string, string>): Uint8Array {
    const parts: Uint8Array[] = [Buffer.from('INFO', 'latin1')];
    for (const [id, value] of Object.entries(entries))
      parts.push(chunk(id, Buffer.from(`${value}\0`, 'latin1')));
    return Buffer.concat(parts);
  }

  const x = sine(48_000, 0.5, 1000, 0.1);

  it('reads bext (Tech 3285 v2 loudness fields), iXML, INFO, and the ISRC from an id3 TSRC frame', async () => {
    const bytes = writeWav([x, x], 48_000, {
      format: 'int24',
      chunksBefore: [
        { id: 'bext', body: bext('Final master', -14.25) },
        { id: 'iXML', body: Buffer.from('<BWFXML><PROJECT>Harbour Lights</PROJECT></BWFXML>') },
      ],
      chunksAfter: [
        { id: 'LIST', body: infoList({ INAM: 'Tide', ISRC: 'Supplier Ltd' }) },
        { id: 'id3 ', body: id3WithTsrc('GB-AYE-25-00001') },
      ],
    });
    const m = await analyzeFileInThread(save('tags.wav', bytes));
    expect(m.format.container).toBe('bwf');
    expect(m.tags.bext).toMatchObject({
      description: 'Final master',
      originator: 'Quayside test',
      originationDate: '2026-01-02',
      originationTime: '10:11:12',
      timeReferenceSamples: 48_000 * 3600,
      version: 2,
      loudnessValueLufs: -14.25,
      loudnessRangeLu: null,
      codingHistory: 'A=PCM,F=48000,W=24,M=stereo',
    });
    expect(m.tags.isrc).toBe('GBAYE2500001');
    expect(m.tags.text).toMatchObject({
      'INFO.INAM': 'Tide',
      'INFO.ISRC': 'Supplier Ltd',
      'iXML.PROJECT': 'Harbour Lights',
    });
  });

  it('never takes RIFF INFO ISRC (which means "source") as the recording ISRC', async () => {
    const bytes = writeWav([x], 48_000, {
      chunksAfter: [{ id: 'LIST', body: infoList({ ISRC: 'GBAYE2500001' }) }],
    });
    const m = await analyzeFileInThread(save('info-isrc.wav', bytes));
    expect(m.tags.isrc).toBeUndefined();
    expect(m.tags.text?.['INFO.ISRC']).toBe('GBAYE2500001');
  });

  it('reads tags after the audio when streaming', async () => {
    const bytes = writeWav([x], 48_000, {
      chunksAfter: [{ id: 'id3 ', body: id3WithTsrc('USRC17607839') }],
    });
    const m = await analyzeStreamInThread(toReadable(bytes, 1000), null);
    expect(m.tags.isrc).toBe('USRC17607839');
  });
});

describe('true-peak kernels', () => {
  it('the WebAssembly SIMD kernel agrees with the JavaScript kernel (4× and 2×, odd lengths)', async () => {
    for (const fs of [44_100, 48_000, 96_000, 88_200]) {
      const frames = fs + 16_385;
      const l = concat(
        pinkNoise(fs, frames / fs, -12, fs),
        sine(fs, 0.5, fs / 4, 1.2, Math.PI / 4),
      );
      const r = concat(sine(fs, 0.5, 997, 0.9), pinkNoise(fs, frames / fs, -10, fs + 1));
      const bytes = writeWav([l, r.subarray(0, l.length)], fs, { format: 'float32' });
      const path = save(`kernels-${fs}.wav`, bytes);
      const simd = await analyzeFileInThread(path, { useSimd: true });
      const js = await analyzeFileInThread(path, { useSimd: false });
      for (const [c, channel] of simd.channels.entries()) {
        expect(Math.abs(channel.truePeakDbtp! - js.channels[c]!.truePeakDbtp!)).toBeLessThan(1e-5);
        expect(
          Math.abs(channel.truePeakAtSeconds! - js.channels[c]!.truePeakAtSeconds!),
        ).toBeLessThan(0.01);
      }
    }
  });
});
