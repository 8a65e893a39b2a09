import { describe, expect, it } from 'vitest';
import {
  checkRelease,
  type DeliveryRules,
  deliveryProfileSchema,
  type Finding,
  type FindingSeverity,
  type MeasurementsByTrack,
  type ReleaseForCheck,
  type RuleId,
} from '@/lib/specs';
import {
  type MeasurementOverrides,
  makeMeasurements,
  makeRelease,
  makeTrack,
  makeTracks,
} from './fixtures';

type Where = 'inside' | 'on' | 'outside';

function check(rules: DeliveryRules, release: ReleaseForCheck, measurements: MeasurementsByTrack) {
  const profile = deliveryProfileSchema.parse({
    id: 'boundary',
    name: 'Boundary',
    description: '',
    version: 1,
    rules,
  });
  return checkRelease(profile, release, measurements);
}

function only(findings: Finding[], ruleId: RuleId, channel: number | null = null): Finding {
  const matching = findings.filter(
    (f) => f.ruleId === ruleId && (channel === null || f.channel === channel),
  );
  expect(matching.length).toBeGreaterThan(0);
  return matching[0]!;
}

interface AudioBoundary {
  ruleId: RuleId;
  rules: DeliveryRules;
  limit: number | string;
  unit: string;
  channel?: number;
  cases: [Where, MeasurementOverrides, FindingSeverity][];
}

const ch1 = (c: MeasurementOverrides['everyChannel']): MeasurementOverrides => ({
  channels: [c ?? {}],
});

// Per rule: just inside, on and just outside the limit. "On" passes for every ceiling and
// floor; for clipping the limit is the shortest run that counts, so "on" fails.
const AUDIO_BOUNDARIES: AudioBoundary[] = [
  {
    ruleId: 'samplePeak',
    rules: { samplePeak: { severity: 'warning', ceilingDbfs: -1 } },
    limit: -1,
    unit: 'dBFS',
    cases: [
      ['inside', { loudness: { samplePeakDbfs: -1.01 } }, 'pass'],
      ['on', { loudness: { samplePeakDbfs: -1 } }, 'pass'],
      ['outside', { loudness: { samplePeakDbfs: -0.99 } }, 'warning'],
    ],
  },
  {
    ruleId: 'truePeak',
    rules: { truePeak: { severity: 'failure', ceilingDbtp: -1 } },
    limit: -1,
    unit: 'dBTP',
    cases: [
      ['inside', { loudness: { truePeakDbtp: -1.01 } }, 'pass'],
      ['on', { loudness: { truePeakDbtp: -1 } }, 'pass'],
      ['outside', { loudness: { truePeakDbtp: -0.99 } }, 'failure'],
    ],
  },
  {
    ruleId: 'integratedLoudness',
    rules: { integratedLoudness: { severity: 'failure', targetLufs: -23, toleranceLu: 1 } },
    limit: -22,
    unit: 'LUFS',
    cases: [
      ['inside', { loudness: { integratedLufs: -22.01 } }, 'pass'],
      ['on', { loudness: { integratedLufs: -22 } }, 'pass'],
      ['outside', { loudness: { integratedLufs: -21.99 } }, 'failure'],
    ],
  },
  {
    ruleId: 'integratedLoudness',
    rules: { integratedLoudness: { severity: 'failure', targetLufs: -23, toleranceLu: 1 } },
    limit: -24,
    unit: 'LUFS',
    cases: [
      ['inside', { loudness: { integratedLufs: -23.99 } }, 'pass'],
      ['on', { loudness: { integratedLufs: -24 } }, 'pass'],
      ['outside', { loudness: { integratedLufs: -24.01 } }, 'failure'],
    ],
  },
  {
    ruleId: 'integratedLoudness',
    rules: { integratedLoudness: { severity: 'warning', maxLufs: -10 } },
    limit: -10,
    unit: 'LUFS',
    cases: [
      ['inside', { loudness: { integratedLufs: -10.1 } }, 'pass'],
      ['on', { loudness: { integratedLufs: -10 } }, 'pass'],
      ['outside', { loudness: { integratedLufs: -9.9 } }, 'warning'],
    ],
  },
  {
    ruleId: 'integratedLoudness',
    rules: { integratedLoudness: { severity: 'warning', minLufs: -20 } },
    limit: -20,
    unit: 'LUFS',
    cases: [
      ['inside', { loudness: { integratedLufs: -19.9 } }, 'pass'],
      ['on', { loudness: { integratedLufs: -20 } }, 'pass'],
      ['outside', { loudness: { integratedLufs: -20.1 } }, 'warning'],
    ],
  },
  {
    ruleId: 'loudnessRange',
    rules: { loudnessRange: { severity: 'warning', maxLu: 8 } },
    limit: 8,
    unit: 'LU',
    cases: [
      ['inside', { loudness: { rangeLu: 7.9 } }, 'pass'],
      ['on', { loudness: { rangeLu: 8 } }, 'pass'],
      ['outside', { loudness: { rangeLu: 8.1 } }, 'warning'],
    ],
  },
  {
    ruleId: 'loudnessRange',
    rules: { loudnessRange: { severity: 'warning', minLu: 3 } },
    limit: 3,
    unit: 'LU',
    cases: [
      ['inside', { loudness: { rangeLu: 3.1 } }, 'pass'],
      ['on', { loudness: { rangeLu: 3 } }, 'pass'],
      ['outside', { loudness: { rangeLu: 2.9 } }, 'warning'],
    ],
  },
  {
    ruleId: 'shortTermLoudness',
    rules: { shortTermLoudness: { severity: 'failure', maxLufs: -18 } },
    limit: -18,
    unit: 'LUFS',
    cases: [
      ['inside', { loudness: { maxShortTermLufs: -18.1 } }, 'pass'],
      ['on', { loudness: { maxShortTermLufs: -18 } }, 'pass'],
      ['outside', { loudness: { maxShortTermLufs: -17.9 } }, 'failure'],
    ],
  },
  {
    ruleId: 'dcOffset',
    rules: { dcOffset: { severity: 'warning', maxPercent: 0.1 } },
    limit: 0.1,
    unit: '%',
    channel: 1,
    cases: [
      ['inside', ch1({ dcOffset: 0.00099 }), 'pass'],
      ['on', ch1({ dcOffset: -0.001 }), 'pass'],
      ['outside', ch1({ dcOffset: -0.00101 }), 'warning'],
    ],
  },
  {
    ruleId: 'clipping',
    rules: { clipping: { severity: 'failure', minRunSamples: 3 } },
    limit: 3,
    unit: 'samples',
    channel: 1,
    cases: [
      ['inside', ch1({ clipping: clipRuns([2]) }), 'pass'],
      ['on', ch1({ clipping: clipRuns([3]) }), 'failure'],
      ['outside', ch1({ clipping: clipRuns([4]) }), 'failure'],
    ],
  },
  {
    ruleId: 'headSilence',
    rules: { headSilence: { severity: 'warning', maxSeconds: 2 } },
    limit: 2,
    unit: 's',
    cases: [
      ['inside', { silence: { headSeconds: 1.99 } }, 'pass'],
      ['on', { silence: { headSeconds: 2 } }, 'pass'],
      ['outside', { silence: { headSeconds: 2.01 } }, 'warning'],
    ],
  },
  {
    ruleId: 'headSilence',
    rules: { headSilence: { severity: 'warning', minSeconds: 0.5 } },
    limit: 0.5,
    unit: 's',
    cases: [
      ['inside', { silence: { headSeconds: 0.51 } }, 'pass'],
      ['on', { silence: { headSeconds: 0.5 } }, 'pass'],
      ['outside', { silence: { headSeconds: 0.49 } }, 'warning'],
    ],
  },
  {
    ruleId: 'tailSilence',
    rules: { tailSilence: { severity: 'warning', maxSeconds: 10 } },
    limit: 10,
    unit: 's',
    cases: [
      ['inside', { silence: { tailSeconds: 9.99 } }, 'pass'],
      ['on', { silence: { tailSeconds: 10 } }, 'pass'],
      ['outside', { silence: { tailSeconds: 10.01 } }, 'warning'],
    ],
  },
  {
    ruleId: 'tailSilence',
    rules: { tailSilence: { severity: 'failure', minSeconds: 1 } },
    limit: 1,
    unit: 's',
    cases: [
      ['inside', { silence: { tailSeconds: 1.01 } }, 'pass'],
      ['on', { silence: { tailSeconds: 1 } }, 'pass'],
      ['outside', { silence: { tailSeconds: 0.99 } }, 'failure'],
    ],
  },
  {
    ruleId: 'abruptStart',
    rules: { abruptStart: { severity: 'warning', maxLevelDbfs: -40 } },
    limit: -40,
    unit: 'dBFS',
    channel: 1,
    cases: [
      ['inside', ch1({ firstSampleDbfs: -40.1 }), 'pass'],
      ['on', ch1({ firstSampleDbfs: -40 }), 'pass'],
      ['outside', ch1({ firstSampleDbfs: -39.9 }), 'warning'],
    ],
  },
  {
    ruleId: 'abruptEnd',
    rules: { abruptEnd: { severity: 'warning', maxLevelDbfs: -40 } },
    limit: -40,
    unit: 'dBFS',
    channel: 1,
    cases: [
      ['inside', ch1({ lastSampleDbfs: -40.1 }), 'pass'],
      ['on', ch1({ lastSampleDbfs: -40 }), 'pass'],
      ['outside', ch1({ lastSampleDbfs: -39.9 }), 'warning'],
    ],
  },
  {
    ruleId: 'lowFrequencyCorrelation',
    rules: { lowFrequencyCorrelation: { severity: 'failure', minCorrelation: 0 } },
    limit: 0,
    unit: '',
    cases: [
      ['inside', { correlation: { lowBand: 0.01 } }, 'pass'],
      ['on', { correlation: { lowBand: 0 } }, 'pass'],
      ['outside', { correlation: { lowBand: -0.01 } }, 'failure'],
    ],
  },
  {
    ruleId: 'lowFrequencyCorrelation',
    rules: { lowFrequencyCorrelation: { severity: 'failure', minCorrelation: 0, warnBelow: 0.5 } },
    limit: 0.5,
    unit: '',
    cases: [
      ['inside', { correlation: { lowBand: 0.51 } }, 'pass'],
      ['on', { correlation: { lowBand: 0.5 } }, 'pass'],
      ['outside', { correlation: { lowBand: 0.49 } }, 'warning'],
    ],
  },
  {
    ruleId: 'trackDuration',
    rules: { trackDuration: { severity: 'failure', minSeconds: 4 } },
    limit: 4,
    unit: 's',
    cases: [
      ['inside', { format: { durationSeconds: 4.01 } }, 'pass'],
      ['on', { format: { durationSeconds: 4 } }, 'pass'],
      ['outside', { format: { durationSeconds: 3.99 } }, 'failure'],
    ],
  },
  {
    ruleId: 'trackDuration',
    rules: { trackDuration: { severity: 'warning', maxSeconds: 600 } },
    limit: 600,
    unit: 's',
    cases: [
      ['inside', { format: { durationSeconds: 599.99 } }, 'pass'],
      ['on', { format: { durationSeconds: 600 } }, 'pass'],
      ['outside', { format: { durationSeconds: 600.01 } }, 'warning'],
    ],
  },
  {
    ruleId: 'effectiveBitDepth',
    rules: { effectiveBitDepth: { severity: 'failure', minBits: 17 } },
    limit: 17,
    unit: 'bit',
    cases: [
      ['inside', { everyChannel: { effectiveBitDepth: 18 } }, 'pass'],
      ['on', { everyChannel: { effectiveBitDepth: 17 } }, 'pass'],
      ['outside', { channels: [{}, { effectiveBitDepth: 16 }] }, 'failure'],
    ],
  },
  {
    ruleId: 'lengthWholeCdFrames',
    rules: { lengthWholeCdFrames: { severity: 'warning' } },
    limit: 0,
    unit: 'samples',
    cases: [
      ['on', { cdFrames: { frames: 13_500, remainderSamples: 0 } }, 'pass'],
      ['outside', { cdFrames: { frames: 13_500, remainderSamples: 1 } }, 'warning'],
      ['outside', { cdFrames: { frames: 13_500, remainderSamples: 587 } }, 'warning'],
    ],
  },
];

function clipRuns(lengths: number[]) {
  return {
    runCount: lengths.length,
    longestRunSamples: Math.max(0, ...lengths),
    minRunSamples: 1,
    runs: lengths.map((lengthSamples, i) => ({ atSeconds: 10 + i, lengthSamples })),
  };
}

describe.each(AUDIO_BOUNDARIES)('$ruleId boundaries (limit $limit $unit)', (boundary) => {
  it.each(boundary.cases)('%s the limit → %s', (_where, overrides, expected) => {
    const track = makeTrack();
    const findings = check(boundary.rules, makeRelease([track]), {
      [track.id]: makeMeasurements(overrides),
    });
    const finding = only(findings, boundary.ruleId, boundary.channel ?? null);
    expect(finding.severity).toBe(expected);
    expect(finding.limit).toBe(boundary.limit);
    expect(finding.unit).toBe(boundary.unit);
    expect(finding.measured).not.toBeNull();
    expect(finding.trackId).toBe(track.id);
    expect(finding.message).toMatch(/^[A-Z].*\.$/);
  });
});

interface SetBoundary {
  ruleId: RuleId;
  rules: DeliveryRules;
  cases: [string, MeasurementOverrides, FindingSeverity, number | string][];
}

const SET_BOUNDARIES: SetBoundary[] = [
  {
    ruleId: 'sampleRate',
    rules: { sampleRate: { severity: 'failure', allowedHz: [44_100] } },
    cases: [
      ['allowed rate', { format: { sampleRateHz: 44_100 } }, 'pass', 44_100],
      ['48 kHz in a 44.1 kHz profile', { format: { sampleRateHz: 48_000 } }, 'failure', 48_000],
    ],
  },
  {
    ruleId: 'bitDepth',
    rules: { bitDepth: { severity: 'failure', allowedBits: [16] } },
    cases: [
      ['16-bit', { format: { bitsPerSample: 16 } }, 'pass', 16],
      ['24-bit', { format: { bitsPerSample: 24 } }, 'failure', 24],
    ],
  },
  {
    ruleId: 'channelCount',
    rules: { channelCount: { severity: 'failure', allowed: [2] } },
    cases: [
      ['stereo', { format: { channels: 2 } }, 'pass', 2],
      ['mono', { format: { channels: 1 } }, 'failure', 1],
      ['three channels', { format: { channels: 3 } }, 'failure', 3],
    ],
  },
  {
    ruleId: 'container',
    rules: { container: { severity: 'failure', allowed: ['wav', 'aiff'], encodings: ['pcm-int'] } },
    cases: [
      ['WAV integer', { format: { container: 'wav' } }, 'pass', 'wav (pcm-int)'],
      ['FLAC', { format: { container: 'flac' } }, 'failure', 'flac'],
      [
        'WAV float',
        { format: { container: 'wav', encoding: 'pcm-float' } },
        'failure',
        'wav (pcm-float)',
      ],
    ],
  },
  {
    ruleId: 'identicalChannels',
    rules: { identicalChannels: { severity: 'warning' } },
    cases: [
      ['different channels', {}, 'pass', 'different'],
      ['identical channels', { correlation: { identicalChannels: true } }, 'warning', 'identical'],
      [
        'mono file',
        { format: { channels: 1 }, correlation: { identicalChannels: true } },
        'pass',
        'mono',
      ],
    ],
  },
  {
    ruleId: 'invertedChannels',
    rules: { invertedChannels: { severity: 'failure' } },
    cases: [
      ['not inverted', {}, 'pass', 'not inverted'],
      ['inverted', { correlation: { invertedChannels: true } }, 'failure', 'inverted'],
    ],
  },
];

describe.each(SET_BOUNDARIES)('$ruleId membership', (boundary) => {
  it.each(boundary.cases)('%s → %s', (_name, overrides, expected, measured) => {
    const track = makeTrack();
    const findings = check(boundary.rules, makeRelease([track]), {
      [track.id]: makeMeasurements(overrides),
    });
    const finding = only(findings, boundary.ruleId);
    expect(finding.severity).toBe(expected);
    expect(finding.measured).toBe(measured);
  });
});

describe('trackCount boundaries (IEC 60908: 99 tracks)', () => {
  it.each([
    [98, 'pass'],
    [99, 'pass'],
    [100, 'failure'],
  ] as const)('%i tracks → %s', (count, expected) => {
    const findings = check(
      { trackCount: { severity: 'failure', max: 99 } },
      makeRelease(makeTracks(count)),
      {},
    );
    const finding = only(findings, 'trackCount');
    expect(finding).toMatchObject({
      severity: expected,
      measured: count,
      limit: 99,
      unit: 'tracks',
      trackId: null,
    });
  });
});

describe('runningTime boundaries', () => {
  const rules: DeliveryRules = {
    runningTime: { severity: 'failure', scope: 'disc', maxSeconds: 4788, warnAboveSeconds: 4440 },
  };
  it.each([
    [4439.9, 'pass', 4440],
    [4440, 'pass', 4440],
    [4440.1, 'warning', 4440],
    [4787.9, 'warning', 4440],
    [4788, 'warning', 4440],
    [4788.1, 'failure', 4788],
  ] as const)('%f s with a 2 s pre-gap → %s', (seconds, expected, limit) => {
    const track = makeTrack({ gapBeforeSeconds: 2 });
    const findings = check(rules, makeRelease([track]), {
      [track.id]: makeMeasurements({ format: { durationSeconds: seconds - 2 } }),
    });
    const finding = only(findings, 'runningTime');
    expect(finding.severity).toBe(expected);
    expect(finding.limit).toBe(limit);
    expect(finding.measured).toBeCloseTo(seconds, 9);
    expect(finding.unit).toBe('s');
  });
});

describe('gap boundaries', () => {
  function checkGaps(rules: DeliveryRules, gaps: number[], overrides: MeasurementOverrides[] = []) {
    const tracks = gaps.map((gap, i) => makeTrack({ position: i + 1, gapBeforeSeconds: gap }));
    const measurements = Object.fromEntries(
      tracks.map((t, i) => [t.id, makeMeasurements(overrides[i] ?? {})]),
    );
    return { tracks, findings: check(rules, makeRelease(tracks), measurements) };
  }

  it.each([
    [2.01, 'pass'],
    [2, 'pass'],
    [1.99, 'failure'],
  ] as const)('first-track pre-gap %f s against 2 s minimum → %s', (gap, expected) => {
    const { findings } = checkGaps({ firstTrackPreGap: { severity: 'failure', minSeconds: 2 } }, [
      gap,
    ]);
    expect(only(findings, 'firstTrackPreGap')).toMatchObject({
      severity: expected,
      measured: gap,
      limit: 2,
      unit: 's',
    });
  });

  it.each([
    [4.99, 'pass'],
    [5, 'pass'],
    [5.01, 'warning'],
  ] as const)('gap between tracks %f s against 5 s maximum → %s', (gap, expected) => {
    const { tracks, findings } = checkGaps(
      { gapBetweenTracks: { severity: 'warning', minSeconds: 0, maxSeconds: 5 } },
      [2, gap],
    );
    const finding = only(findings, 'gapBetweenTracks');
    expect(finding).toMatchObject({ severity: expected, trackId: tracks[1]!.id, limit: 5 });
    expect(findings.filter((f) => f.ruleId === 'gapBetweenTracks')).toHaveLength(1);
  });

  it.each([
    [2, 'pass', 150],
    [2 + 1 / 75, 'pass', 151],
    [2 + 1e-7, 'pass', 150],
    [2.005, 'failure', 'whole frames'],
  ] as const)('gap of %f s in whole CD frames → %s', (gap, expected, limit) => {
    const { findings } = checkGaps({ gapWholeCdFrames: { severity: 'failure' } }, [gap]);
    expect(only(findings, 'gapWholeCdFrames')).toMatchObject({
      severity: expected,
      limit,
      unit: 'CD frames',
    });
  });

  it.each([
    [-40.1, 'pass'],
    [-40, 'pass'],
    [-39.9, 'warning'],
  ] as const)('gapless join stepping from silence to %f dBFS → %s', (level, expected) => {
    const { tracks, findings } = checkGaps(
      { gaplessJoin: { severity: 'warning', maxStepDbfs: -40, maxSilenceSeconds: 0.5 } },
      [2, 0],
      [
        { silence: { tailSeconds: 0 } },
        { silence: { headSeconds: 0 }, channels: [{ firstSampleDbfs: level }] },
      ],
    );
    const finding = only(findings, 'gaplessJoin', 1);
    expect(finding).toMatchObject({
      severity: expected,
      trackId: tracks[1]!.id,
      limit: -40,
      unit: 'dBFS',
      atSeconds: 0,
    });
    expect(finding.measured).toBeCloseTo(level, 9);
  });

  it.each([
    [0.49, 'pass'],
    [0.5, 'pass'],
    [0.51, 'warning'],
  ] as const)('gapless join holding %f s of silence → %s', (silence, expected) => {
    const { findings } = checkGaps(
      { gaplessJoin: { severity: 'warning', maxStepDbfs: -40, maxSilenceSeconds: 0.5 } },
      [2, 0],
      [{ silence: { tailSeconds: silence - 0.2 } }, { silence: { headSeconds: 0.2 } }],
    );
    const finding = findings.find((f) => f.ruleId === 'gaplessJoin' && f.channel === null)!;
    expect(finding.severity).toBe(expected);
    expect(finding.measured).toBeCloseTo(silence, 9);
    expect(finding).toMatchObject({ limit: 0.5, unit: 's' });
  });

  it.each([
    [1.99, 'pass'],
    [2, 'pass'],
    [2.01, 'warning'],
  ] as const)('a 2 s gap plus %f s of silence in the files → %s', (silence, expected) => {
    const { findings } = checkGaps(
      { gapDoubledBySilence: { severity: 'warning', maxSilenceSeconds: 2 } },
      [2, 2],
      [{ silence: { tailSeconds: silence - 0.5 } }, { silence: { headSeconds: 0.5 } }],
    );
    const finding = only(findings, 'gapDoubledBySilence');
    expect(finding.severity).toBe(expected);
    expect(finding.measured).toBeCloseTo(silence, 9);
    expect(finding).toMatchObject({ limit: 2, unit: 's', atSeconds: 0 });
  });
});

describe('metadata boundaries', () => {
  it.each([
    ['QZ9AB2600001', 'pass'],
    ['  ', 'failure'],
    [null, 'failure'],
  ] as const)('ISRC present: %j → %s', (isrc, expected) => {
    const findings = check(
      { isrcPresent: { severity: 'failure' } },
      makeRelease([makeTrack({ isrc })]),
      {},
    );
    expect(only(findings, 'isrcPresent').severity).toBe(expected);
  });

  it.each([
    ['qz-9ab-26-00001', 'pass'],
    ['QZ9AB260001', 'failure'],
    ['Q19AB2600001', 'failure'],
  ] as const)('ISRC valid: %j → %s', (isrc, expected) => {
    const findings = check(
      { isrcValid: { severity: 'failure' } },
      makeRelease([makeTrack({ isrc })]),
      {},
    );
    const finding = only(findings, 'isrcValid');
    expect(finding.severity).toBe(expected);
    expect(finding.measured).toBe(isrc);
  });

  it('ISRC unique in release: a shared ISRC fails on both tracks, in any writing', () => {
    const tracks = [
      makeTrack({ position: 1, isrc: 'QZ9AB2600001' }),
      makeTrack({ position: 2, isrc: 'qz-9ab-26-00001' }),
      makeTrack({ position: 3, isrc: 'QZ9AB2600003' }),
    ];
    const findings = check(
      { isrcUniqueInRelease: { severity: 'failure' } },
      makeRelease(tracks),
      {},
    );
    expect(findings.map((f) => [f.trackId, f.severity])).toEqual([
      [tracks[0]!.id, 'failure'],
      [tracks[1]!.id, 'failure'],
      [tracks[2]!.id, 'pass'],
    ]);
    expect(findings[0]!.message).toBe(
      'ISRC QZ-9AB-26-00001 is also on track 2 of this release; each recording needs its own ISRC.',
    );
  });

  it.each([
    ['no other use', [], 'pass'],
    ['the same recording on another release', ['rec-same'], 'pass'],
    ['a different recording', ['rec-other'], 'failure'],
    ['the same and a different recording', ['rec-same', 'rec-other'], 'failure'],
  ] as const)('ISRC consistent across the label: %s → %s', (_name, holders, expected) => {
    const track = makeTrack({ isrc: 'QZ9AB2600001', recordingId: 'rec-same' });
    const findings = check(
      { isrcConsistentInLabel: { severity: 'failure' } },
      makeRelease([track], { labelIsrcRecordings: { QZ9AB2600001: holders } }),
      {},
    );
    expect(only(findings, 'isrcConsistentInLabel').severity).toBe(expected);
  });

  it.each([
    ['8904000210037', 'pass'],
    ['036000291452', 'pass'],
    ['8904000210036', 'failure'],
    ['890400021003', 'failure'],
    [null, 'failure'],
  ] as const)('UPC/EAN %j → %s', (barcode, expected) => {
    const findings = check({ barcode: { severity: 'failure' } }, makeRelease([], { barcode }), {});
    const finding = only(findings, 'barcode');
    expect(finding).toMatchObject({ severity: expected, trackId: null, measured: barcode });
  });

  it.each([
    [[{ name: 'A. Writer', role: 'composer' }], 'pass'],
    [[{ name: 'A. Producer', role: 'producer' }], 'failure'],
    [[{ name: ' ', role: 'composer' }], 'failure'],
    [[], 'failure'],
  ] as const)('required composer credit with %j → %s', (credits, expected) => {
    const findings = check(
      { requiredCredits: { severity: 'failure', roles: ['composer'] } },
      makeRelease([makeTrack({ credits: [...credits] })]),
      {},
    );
    expect(only(findings, 'requiredCredits').severity).toBe(expected);
  });

  it.each([
    [{ widthPx: 3001, heightPx: 3001, format: 'png' }, 'pass'],
    [{ widthPx: 3000, heightPx: 3000, format: 'jpg' }, 'pass'],
    [{ widthPx: 2999, heightPx: 2999, format: 'jpeg' }, 'failure'],
    [{ widthPx: 3000, heightPx: 3001, format: 'jpeg' }, 'failure'],
    [{ widthPx: 3000, heightPx: 3000, format: 'gif' }, 'failure'],
    [null, 'failure'],
  ] as const)('artwork %j → %s', (artwork, expected) => {
    const findings = check(
      {
        artwork: {
          severity: 'failure',
          minWidthPx: 3000,
          minHeightPx: 3000,
          formats: ['jpeg', 'png'],
          square: true,
        },
      },
      makeRelease([], { artwork: artwork === null ? null : { ...artwork } }),
      {},
    );
    expect(only(findings, 'artwork')).toMatchObject({ severity: expected, unit: 'px' });
  });
});
