/**
 * EBU Tech 3341 (EBU Mode metering) and Tech 3342 (loudness range) minimum-requirement
 * signals, synthesised here from their published descriptions (../shared/REFERENCES.md §2),
 * each checked against the expected value and tolerance of the document.
 */
import { describe, expect, it } from 'vitest';
import { measureChannels } from './support/measure.ts';
import { concat, dbToAmplitude, silence, sine } from './support/signals.ts';

const FS = 48_000;
const tone = (seconds: number, dbfs: number): Float64Array =>
  sine(FS, seconds, 1000, dbToAmplitude(dbfs));
const stereo = (x: Float64Array): Float64Array[] => [x, x];
// Tech 3341 §2: ±0.1 LU for M, S and I.
const LOUDNESS_TOLERANCE_LU = 0.1;
// Tech 3342: ±1 LU for LRA.
const LRA_TOLERANCE_LU = 1;

function expectWithin(actual: number | null, expected: number, tolerance: number): void {
  expect(actual).not.toBeNull();
  expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(tolerance);
}

/** Tech 3341 true-peak tolerance: +0.2 / −0.4 dB. */
function expectTruePeak(actual: number | null, expected: number): void {
  expect(actual).not.toBeNull();
  expect(actual as number).toBeLessThanOrEqual(expected + 0.2);
  expect(actual as number).toBeGreaterThanOrEqual(expected - 0.4);
}

describe('EBU Tech 3341 loudness cases', () => {
  it('case 1: −23 dBFS sine, 20 s → M, S, I = −23.0 LUFS ±0.1', async () => {
    const m = await measureChannels(stereo(tone(20, -23)), FS);
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
    expectWithin(m.loudness.maxMomentaryLufs, -23, LOUDNESS_TOLERANCE_LU);
    expectWithin(m.loudness.maxShortTermLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 2: −33 dBFS sine, 20 s → M, S, I = −33.0 LUFS ±0.1', async () => {
    const m = await measureChannels(stereo(tone(20, -33)), FS);
    expectWithin(m.loudness.integratedLufs, -33, LOUDNESS_TOLERANCE_LU);
    expectWithin(m.loudness.maxMomentaryLufs, -33, LOUDNESS_TOLERANCE_LU);
    expectWithin(m.loudness.maxShortTermLufs, -33, LOUDNESS_TOLERANCE_LU);
  });

  it('case 3: −36 / −23 / −36 dBFS for 10 / 60 / 10 s → I = −23.0 ±0.1 (relative gate)', async () => {
    const m = await measureChannels(
      stereo(concat(tone(10, -36), tone(60, -23), tone(10, -36))),
      FS,
    );
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 4: −72 / −36 / −23 / −36 / −72 dBFS for 10 / 10 / 60 / 10 / 10 s → I = −23.0 ±0.1 (absolute gate)', async () => {
    const signal = concat(
      tone(10, -72),
      tone(10, -36),
      tone(60, -23),
      tone(10, -36),
      tone(10, -72),
    );
    const m = await measureChannels(stereo(signal), FS);
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 5: −26 / −20 / −26 dBFS for 20 / 20.1 / 20 s → I = −23.0 ±0.1', async () => {
    const m = await measureChannels(
      stereo(concat(tone(20, -26), tone(20.1, -20), tone(20, -26))),
      FS,
    );
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 6: 5.0 channels L R −28, C −24, Ls Rs −30 dBFS, 20 s → I = −23.0 ±0.1', async () => {
    const lr = tone(20, -28);
    const m = await measureChannels([lr, lr, tone(20, -24), tone(20, -30), tone(20, -30)], FS);
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 9: (1.34 s at −20 + 1.66 s at −30 dBFS) × 5 → S = −23.0 ±0.1, constant after 3 s', async () => {
    const period = concat(tone(1.34, -20), tone(1.66, -30));
    const m = await measureChannels(stereo(concat(period, period, period, period, period)), FS);
    expectWithin(m.loudness.maxShortTermLufs, -23, LOUDNESS_TOLERANCE_LU);
    const { stepSeconds, shortTermLufs } = m.series.loudness;
    const afterThreeSeconds = shortTermLufs.filter((_, i) => (i + 1) * stepSeconds >= 3 - 1e-9);
    expect(afterThreeSeconds.length).toBeGreaterThan(100);
    for (const value of afterThreeSeconds) expectWithin(value, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 10: 3 s tone at −23 dBFS offset by 0.15 s steps (20 files) → max S = −23.0 ±0.1 each', async () => {
    for (let file = 0; file < 20; file++) {
      const signal = concat(silence(FS, 0.5 + file * 0.15), tone(3, -23), silence(FS, 0.5));
      const m = await measureChannels(stereo(signal), FS);
      expectWithin(m.loudness.maxShortTermLufs, -23, LOUDNESS_TOLERANCE_LU);
    }
  });

  it('case 11: 3 s tones at −38 … −19 dBFS in 6 s segments → successive max S = −38 … −19 ±0.1', async () => {
    const segments: Float64Array[] = [];
    for (let k = 0; k < 20; k++)
      segments.push(concat(silence(FS, 1.5), tone(3, -38 + k), silence(FS, 1.5)));
    const m = await measureChannels(stereo(concat(...segments)), FS);
    const { stepSeconds, shortTermLufs } = m.series.loudness;
    for (let k = 0; k < 20; k++) {
      // Max of the short-term series within segment k (the point at t covers (t − 3 s, t]).
      const inSegment = shortTermLufs.filter((_, i) => {
        const t = (i + 1) * stepSeconds;
        return t > 6 * k + 1e-9 && t <= 6 * (k + 1) + 1e-9;
      });
      const max = Math.max(...inSegment.map((v) => v ?? -Infinity));
      expectWithin(max, -38 + k, LOUDNESS_TOLERANCE_LU);
    }
  });

  it('case 12: (0.18 s at −20 + 0.22 s at −30 dBFS) × 25 → M = −23.0 ±0.1, constant after 1 s', async () => {
    const period = concat(tone(0.18, -20), tone(0.22, -30));
    const m = await measureChannels(
      stereo(concat(...Array.from({ length: 25 }, () => period))),
      FS,
    );
    expectWithin(m.loudness.maxMomentaryLufs, -23, LOUDNESS_TOLERANCE_LU);
    // Any 400 ms window holds one whole period, so integrated (400 ms blocks) reads the same.
    expectWithin(m.loudness.integratedLufs, -23, LOUDNESS_TOLERANCE_LU);
  });

  it('case 13: 0.4 s tone at −23 dBFS offset by 0.02 s steps (20 files) → max M = −23.0 ±0.1 each', async () => {
    for (let file = 0; file < 20; file++) {
      const signal = concat(silence(FS, 0.5 + file * 0.02), tone(0.4, -23), silence(FS, 0.5));
      const m = await measureChannels(stereo(signal), FS);
      expectWithin(m.loudness.maxMomentaryLufs, -23, LOUDNESS_TOLERANCE_LU);
    }
  });

  it('case 14: 0.4 s tones at −38 … −19 dBFS in 0.8 s segments → successive max M = −38 … −19 ±0.1', async () => {
    // Each 0.8 s segment measured on its own: the momentary maximum of a segment is that of its tone.
    for (let k = 0; k < 20; k++) {
      const segment = concat(silence(FS, 0.2), tone(0.4, -38 + k), silence(FS, 0.2));
      const m = await measureChannels(stereo(segment), FS);
      expectWithin(m.loudness.maxMomentaryLufs, -38 + k, LOUDNESS_TOLERANCE_LU);
    }
  });
});

describe('EBU Tech 3341 true-peak cases (tolerance +0.2 / −0.4 dB)', () => {
  const degrees = Math.PI / 180;
  const cases = [
    { id: 15, frequencyHz: FS / 4, amplitude: 0.5, phase: 0, expected: -6 },
    { id: 16, frequencyHz: FS / 4, amplitude: 0.5, phase: 45, expected: -6 },
    { id: 17, frequencyHz: FS / 6, amplitude: 0.5, phase: 60, expected: -6 },
    { id: 18, frequencyHz: FS / 8, amplitude: 0.5, phase: 67.5, expected: -6 },
    { id: 19, frequencyHz: FS / 4, amplitude: 1.41, phase: 45, expected: 3 },
  ];
  for (const c of cases) {
    it(`case ${c.id}: ${c.frequencyHz} Hz, amplitude ${c.amplitude}, phase ${c.phase}° → ${c.expected} dBTP`, async () => {
      const x = sine(FS, 3, c.frequencyHz, c.amplitude, c.phase * degrees);
      const m = await measureChannels(stereo(x), FS, { format: 'float32' });
      expectTruePeak(m.loudness.truePeakDbtp, c.expected);
    });
  }

  // Cases 20–23: the same band-limited peak at 0 dBTP sampled at four sub-sample offsets.
  // Synthesis (an inference, REFERENCES.md §2): Hann-windowed sinc, ~19 kHz bandwidth, peak 1.0.
  for (const [index, offset] of [0, 0.25, 0.5, 0.75].entries()) {
    it(`case ${20 + index}: band-limited pulse centred ${offset} sample off the grid → 0.0 dBTP`, async () => {
      const n = FS;
      const x = new Float64Array(n);
      const centre = n / 2 + offset;
      const bandwidth = (2 * 19_000) / FS;
      const halfWidth = 64;
      for (let i = Math.floor(centre) - halfWidth; i <= Math.ceil(centre) + halfWidth; i++) {
        const t = i - centre;
        const sinc = t === 0 ? 1 : Math.sin(Math.PI * bandwidth * t) / (Math.PI * bandwidth * t);
        const hann = 0.5 * (1 + Math.cos((Math.PI * t) / (halfWidth + 1)));
        x[i] = sinc * hann;
      }
      const m = await measureChannels(stereo(x), FS, { format: 'float32' });
      expectTruePeak(m.loudness.truePeakDbtp, 0);
    });
  }
});

describe('EBU Tech 3342 loudness-range cases (±1 LU)', () => {
  const cases = [
    { id: 1, levels: [-20, -30], expected: 10 },
    { id: 2, levels: [-20, -15], expected: 5 },
    { id: 3, levels: [-40, -20], expected: 20 },
    { id: 4, levels: [-50, -35, -20, -35, -50], expected: 15 },
  ];
  for (const c of cases) {
    it(`case ${c.id}: ${c.levels.join(' → ')} dBFS, 20 s each → LRA ${c.expected} LU`, async () => {
      const m = await measureChannels(stereo(concat(...c.levels.map((db) => tone(20, db)))), FS);
      expectWithin(m.loudness.rangeLu, c.expected, LRA_TOLERANCE_LU);
    });
  }
});
