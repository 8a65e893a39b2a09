import { describe, expect, it } from 'vitest';
import {
  BROADCAST_R128,
  BUILT_IN_PROFILES,
  CD_MASTER,
  copyProfile,
  deliveryProfileSchema,
  estimateVinylLevelDb,
  findBuiltInProfile,
  PRE_LIMITER,
  STREAMING_HIRES,
  STREAMING_STANDARD,
  VINYL_7_45,
  VINYL_12_33,
  VINYL_12_45,
} from '@/lib/specs';

describe('built-in profiles', () => {
  it('have the stable ids the product refers to, each valid against the schema', () => {
    expect(BUILT_IN_PROFILES.map((p) => p.id)).toEqual([
      'streaming-hires',
      'streaming-standard',
      'cd-master',
      'vinyl-12-33',
      'vinyl-12-45',
      'vinyl-7-45',
      'broadcast-r128',
      'pre-limiter',
    ]);
    for (const profile of BUILT_IN_PROFILES) {
      expect(deliveryProfileSchema.safeParse(profile).success).toBe(true);
      expect(findBuiltInProfile(profile.id)).toBe(profile);
    }
    expect(findBuiltInProfile('nope')).toBeUndefined();
  });

  it('Compact Disc master matches IEC 60908 (Red Book), REFERENCES §6', () => {
    const r = CD_MASTER.rules;
    // IEC 60908: 44.1 kHz, 16-bit, 2 channels.
    expect(r.sampleRate?.allowedHz).toEqual([44_100]);
    expect(r.bitDepth?.allowedBits).toEqual([16]);
    expect(r.channelCount?.allowed).toEqual([2]);
    // IEC 60908: at most 99 tracks, each at least 4 s.
    expect(r.trackCount).toEqual({ severity: 'failure', max: 99 });
    expect(r.trackDuration).toEqual({ severity: 'failure', minSeconds: 4 });
    // 74 min original specification (333,000 sectors / 75 = 4440 s); 79.8 min practical.
    expect(333_000 / 75).toBe(4440);
    expect(r.runningTime).toMatchObject({
      scope: 'disc',
      warnAboveSeconds: 4440,
      maxSeconds: 4788,
    });
    // MMC-5 §4.2.3.5.2: 150 sectors = 2 s pre-gap before track 1.
    expect(150 / 75).toBe(r.firstTrackPreGap?.minSeconds);
    expect(r.gapWholeCdFrames?.severity).toBe('failure');
    // 588 sample frames per sector at 44.1 kHz: 44,100 / 75.
    expect(44_100 / 75).toBe(588);
    expect(r.lengthWholeCdFrames).toBeDefined();
    // ISO 3901 ISRC in subcode Q mode 3; GS1 UPC/EAN as MCN in mode 2.
    expect(r.isrcValid?.severity).toBe('failure');
    expect(r.barcode?.severity).toBe('warning');
  });

  it('broadcast profile matches EBU R 128, REFERENCES §3', () => {
    const r = BROADCAST_R128.rules;
    // EBU R 128: −23.0 LUFS target; v4.0 production tolerance ±1 LU.
    expect(r.integratedLoudness).toEqual({ severity: 'failure', targetLufs: -23, toleranceLu: 1 });
    // EBU R 128: maximum permitted true peak −1 dBTP.
    expect(r.truePeak).toEqual({ severity: 'failure', ceilingDbtp: -1 });
  });

  it('streaming profiles match PRODUCT.md and the ISO 3901 / GS1 metadata rules', () => {
    // High resolution: 24-bit PCM, 44.1–192 kHz.
    expect(STREAMING_HIRES.rules.bitDepth?.allowedBits).toEqual([24]);
    expect(STREAMING_HIRES.rules.sampleRate?.allowedHz).toEqual([
      44_100, 48_000, 88_200, 96_000, 176_400, 192_000,
    ]);
    expect(STREAMING_HIRES.rules.effectiveBitDepth?.minBits).toBeGreaterThan(16);
    // Standard: 16/24-bit, 44.1/48 kHz.
    expect(STREAMING_STANDARD.rules.bitDepth?.allowedBits).toEqual([16, 24]);
    expect(STREAMING_STANDARD.rules.sampleRate?.allowedHz).toEqual([44_100, 48_000]);
    for (const profile of [STREAMING_HIRES, STREAMING_STANDARD]) {
      // ISO 3901 (REFERENCES §4): present, well formed, one recording per ISRC.
      expect(profile.rules.isrcPresent?.severity).toBe('failure');
      expect(profile.rules.isrcValid?.severity).toBe('failure');
      expect(profile.rules.isrcUniqueInRelease?.severity).toBe('failure');
      expect(profile.rules.isrcConsistentInLabel?.severity).toBe('failure');
      // GS1 (REFERENCES §5).
      expect(profile.rules.barcode?.severity).toBe('failure');
      // AES TD1004/TD1008 −1 dBTP maximum (REFERENCES §3, from memory).
      expect(profile.rules.truePeak?.ceilingDbtp).toBe(-1);
      // Cover art 3000 × 3000 px square JPEG/PNG: common distributor practice (issue 5).
      expect(profile.rules.artwork).toMatchObject({
        minWidthPx: 3000,
        minHeightPx: 3000,
        square: true,
      });
      expect(profile.rules.requiredCredits?.roles).toEqual(['composer']);
    }
  });

  it.each([
    // REFERENCES §9 (common practice, lossenderosstudio.com chart): full-level length and
    // the longest charted length per side.
    [VINYL_12_33, '12-33', 20, 28],
    [VINYL_12_45, '12-45', 13.5, 16],
    [VINYL_7_45, '7-45', 5, 6],
  ] as const)(
    '$id side lengths follow the cutting chart',
    (profile, format, fullLevelMinutes, maxMinutes) => {
      expect(profile.rules.runningTime).toEqual({
        severity: 'failure',
        scope: 'side',
        warnAboveSeconds: fullLevelMinutes * 60,
        maxSeconds: maxMinutes * 60,
        vinylFormat: format,
      });
      // REFERENCES §9: peaks at or below −1 dBFS; no clipping; bass correlation 0.5…+1, never negative.
      expect(profile.rules.samplePeak?.ceilingDbfs).toBe(-1);
      expect(profile.rules.clipping).toEqual({ severity: 'failure', minRunSamples: 1 });
      expect(profile.rules.lowFrequencyCorrelation).toEqual({
        severity: 'failure',
        minCorrelation: 0,
        warnBelow: 0.5,
      });
      // REFERENCES §9: loudness no higher than about −10 to −12 LUFS.
      expect(profile.rules.integratedLoudness?.maxLufs).toBe(-10);
      expect(profile.rules.bitDepth?.allowedBits).toEqual([24, 32]);
    },
  );

  it('pre-limiter master keeps about 5 dB of headroom and never clips (common practice)', () => {
    expect(PRE_LIMITER.rules.samplePeak?.ceilingDbfs).toBe(-5);
    expect(PRE_LIMITER.rules.clipping).toEqual({ severity: 'failure', minRunSamples: 1 });
  });
});

describe('vinyl level guidance (REFERENCES §9, common practice)', () => {
  it.each([
    ['12-33', 18 * 60, 0],
    ['12-33', 20 * 60, 0],
    ['12-33', 22 * 60, -1.5],
    ['12-33', 24 * 60, -3],
    ['12-33', 28 * 60, -6],
    ['12-45', 10.5 * 60, 3],
    ['12-45', 13.5 * 60, 0],
    ['7-45', 6 * 60, -3],
  ] as const)('%s side of %i s can be cut at %f dB', (format, seconds, level) => {
    expect(estimateVinylLevelDb(format, seconds)).toBeCloseTo(level, 9);
  });

  it('gives no figure beyond the chart', () => {
    expect(estimateVinylLevelDb('12-33', 29 * 60)).toBeNull();
  });
});

describe('deliveryProfileSchema', () => {
  const base = { id: 'my-store', name: 'My store', description: '', version: 1 };

  it('accepts an empty rule set and a copy of a built-in', () => {
    expect(deliveryProfileSchema.safeParse({ ...base, rules: {} }).success).toBe(true);
    const copy = copyProfile(CD_MASTER, 'label-cd', 'Our CD plant');
    expect(copy).toMatchObject({ id: 'label-cd', name: 'Our CD plant', version: 1 });
    expect(copy.rules).toEqual(CD_MASTER.rules);
    expect(copy.rules).not.toBe(CD_MASTER.rules);
  });

  it.each([
    ['an unknown rule', { ...base, rules: { loudnes: { severity: 'warning' } } }],
    [
      'an unknown field in a rule',
      { ...base, rules: { truePeak: { severity: 'failure', ceilingDbtp: -1, extra: 1 } } },
    ],
    ['a severity of pass', { ...base, rules: { truePeak: { severity: 'pass', ceilingDbtp: -1 } } }],
    [
      'a target without tolerance',
      { ...base, rules: { integratedLoudness: { severity: 'failure', targetLufs: -23 } } },
    ],
    [
      'a loudness rule with no bound',
      { ...base, rules: { integratedLoudness: { severity: 'failure' } } },
    ],
    [
      'a silence range upside down',
      { ...base, rules: { headSilence: { severity: 'warning', minSeconds: 3, maxSeconds: 1 } } },
    ],
    [
      'an empty sample-rate list',
      { ...base, rules: { sampleRate: { severity: 'failure', allowedHz: [] } } },
    ],
    ['an id with spaces', { ...base, id: 'My Store', rules: {} }],
    ['version 0', { ...base, version: 0, rules: {} }],
  ])('rejects %s', (_name, input) => {
    expect(deliveryProfileSchema.safeParse(input).success).toBe(false);
  });
});
