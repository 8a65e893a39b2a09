import { describe, expect, it } from 'vitest';
import {
  AUDIO_RULE_IDS,
  BUILT_IN_PROFILES,
  CD_MASTER,
  checkRelease,
  checkReleaseAgainstProfiles,
  type Finding,
  type MeasurementsByTrack,
  STREAMING_HIRES,
  summarizeVerdicts,
  VINYL_12_33,
} from '@/lib/specs';
import { makeMeasurements, makeRelease, makeTrack, makeTracks } from './fixtures';

const problems = (findings: Finding[]) =>
  findings.filter((f) => f.severity !== 'pass').map((f) => [f.ruleId, f.trackId, f.severity]);

/** A clean 16-bit CD track that joins its neighbours without silence. */
const cdClean = (overrides: Parameters<typeof makeMeasurements>[0] = {}) =>
  makeMeasurements({
    ...overrides,
    format: { bitsPerSample: 16, ...overrides.format },
    silence: { headSeconds: 0, tailSeconds: 0, ...overrides.silence },
  });

describe('checkRelease', () => {
  it('passes a clean CD release with a pass finding for every configured rule', () => {
    const tracks = makeTracks(3);
    const measurements = Object.fromEntries(tracks.map((t) => [t.id, cdClean()]));
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), measurements);
    expect(problems(findings)).toEqual([]);
    const ruleIds = new Set(findings.map((f) => f.ruleId));
    for (const ruleId of Object.keys(CD_MASTER.rules)) {
      // gapDoubledBySilence only speaks where a declared gap is above 0.
      if (ruleId !== 'gapDoubledBySilence') expect(ruleIds).toContain(ruleId);
    }
  });

  it('reports exactly the problems planted in a CD release', () => {
    const tracks = makeTracks(5);
    tracks[2]!.isrc = tracks[1]!.isrc;
    const [t1, t2, t3, t4, t5] = tracks.map((t) => t.id) as [
      string,
      string,
      string,
      string,
      string,
    ];
    const measurements: MeasurementsByTrack = {
      [t1]: cdClean({ format: { sampleRateHz: 48_000 } }),
      [t2]: cdClean({ loudness: { truePeakDbtp: -0.3, truePeakAtSeconds: 83.4 } }),
      [t3]: cdClean({
        format: { durationSeconds: 3, durationSamples: 3 * 44_100 },
        cdFrames: { frames: 225, remainderSamples: 0 },
      }),
      [t4]: cdClean({ everyChannel: { lastSampleDbfs: -60 } }),
      [t5]: cdClean({ everyChannel: { firstSampleDbfs: -6 } }),
    };
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), measurements);
    expect(problems(findings)).toEqual([
      ['sampleRate', t1, 'failure'],
      ['truePeak', t2, 'warning'],
      ['isrcUniqueInRelease', t2, 'failure'],
      ['trackDuration', t3, 'failure'],
      ['isrcUniqueInRelease', t3, 'failure'],
      ['gaplessJoin', t5, 'warning'],
      ['gaplessJoin', t5, 'warning'],
    ]);
    const truePeak = findings.find((f) => f.ruleId === 'truePeak' && f.trackId === t2)!;
    expect(truePeak).toMatchObject({ measured: -0.3, limit: -1, unit: 'dBTP', atSeconds: 83.4 });
    expect(truePeak.message).toBe(
      'True peak reaches −0.3 dBTP at 1:23.4, above the −1.0 dBTP ceiling.',
    );
    const sampleRate = findings.find((f) => f.ruleId === 'sampleRate' && f.trackId === t1)!;
    expect(sampleRate.message).toBe('The file is 48 kHz; this profile takes 44.1 kHz.');
    const click = findings.find(
      (f) => f.ruleId === 'gaplessJoin' && f.trackId === t5 && f.channel === 1,
    )!;
    expect(click).toMatchObject({ unit: 'dBFS', limit: -40, atSeconds: 0 });
    expect(click.message).toMatch(
      /^Channel 1 jumps from −60\.0 dBFS at the end of track 4 to −6\.0 dBFS at the start of track 5, a step of at least −6\.\d dBFS: expect a click at the gapless join\.$/,
    );
  });

  it('flags 16-bit audio padded to 24 bits for high resolution', () => {
    const track = makeTrack();
    const findings = checkRelease(STREAMING_HIRES, makeRelease([track]), {
      [track.id]: makeMeasurements({
        everyChannel: { effectiveBitDepth: 16 },
        silence: { tailSeconds: 0.5 },
      }),
    });
    expect(problems(findings)).toEqual([['effectiveBitDepth', track.id, 'failure']]);
    expect(findings.find((f) => f.ruleId === 'effectiveBitDepth')!.message).toBe(
      'Only 16 of the 24 stored bits ever change: this looks like 16-bit audio padded out, and the profile asks for at least 17 bits that carry audio.',
    );
  });

  it('says, rule by rule, that a track without analysed audio cannot be checked', () => {
    const track = makeTrack({ gapBeforeSeconds: 2 });
    const findings = checkRelease(CD_MASTER, makeRelease([track]), {});
    const audioFindings = findings.filter((f) =>
      (AUDIO_RULE_IDS as readonly string[]).includes(f.ruleId),
    );
    const configured = AUDIO_RULE_IDS.filter((id) => CD_MASTER.rules[id] !== undefined);
    expect(audioFindings.map((f) => f.ruleId)).toEqual(configured);
    for (const finding of audioFindings) {
      expect(finding.measured).toBeNull();
      expect(finding.severity).toBe(CD_MASTER.rules[finding.ruleId]!.severity);
      expect(finding.message).toMatch(
        /^No audio has been analysed for this track yet, so the .+ check cannot run\.$/,
      );
    }
    expect(findings.find((f) => f.ruleId === 'runningTime')).toMatchObject({
      severity: 'failure',
      measured: null,
      message: 'Disc 1 cannot be timed until every track has analysed audio (1 missing).',
    });
  });

  it('gives every finding a unique, stable key under every built-in profile', () => {
    const tracks = [
      ...makeTracks(3, { disc: 1, side: 'A' }),
      ...makeTracks(2, { disc: 1, side: 'B' }),
      ...makeTracks(2, { disc: 2, side: null }),
    ];
    const measurements = Object.fromEntries(tracks.slice(1).map((t) => [t.id, makeMeasurements()]));
    const release = makeRelease(tracks);
    for (const profile of BUILT_IN_PROFILES) {
      const first = checkRelease(profile, release, measurements);
      const keys = first.map((f) => f.key);
      expect(new Set(keys).size).toBe(keys.length);
      expect(checkRelease(profile, release, measurements).map((f) => f.key)).toEqual(keys);
      for (const finding of first) {
        expect(
          finding.key.startsWith(`${profile.id}:${finding.ruleId}:${finding.trackId ?? ''}`),
        ).toBe(true);
        expect(finding.message).toMatch(/^[A-Z].*\.$/);
      }
    }
  });

  it('keys name profile, rule, track and channel', () => {
    const track = makeTrack({ id: 'trk-a' });
    const findings = checkRelease(CD_MASTER, makeRelease([track], { barcode: null }), {
      'trk-a': cdClean({ channels: [{ dcOffset: 0.01 }] }),
    });
    expect(findings.find((f) => f.ruleId === 'dcOffset' && f.channel === 1)?.key).toBe(
      'cd-master:dcOffset:trk-a:ch1',
    );
    expect(findings.find((f) => f.ruleId === 'truePeak')?.key).toBe('cd-master:truePeak:trk-a:all');
    expect(findings.find((f) => f.ruleId === 'barcode')?.key).toBe('cd-master:barcode:release:all');
    expect(findings.find((f) => f.ruleId === 'runningTime')?.key).toBe(
      'cd-master:runningTime:disc-1:all',
    );
  });

  it('orders findings by playing order, release-level last', () => {
    const tracks = [makeTrack({ position: 2 }), makeTrack({ position: 1, gapBeforeSeconds: 2 })];
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), {});
    const order = findings.map((f) => f.trackId);
    const firstRelease = order.indexOf(null);
    expect(
      order.slice(0, order.lastIndexOf(tracks[1]!.id) + 1).every((id) => id === tracks[1]!.id),
    ).toBe(true);
    expect(order.slice(firstRelease).every((id) => id === null)).toBe(true);
  });

  it('does not call a gapless join an abrupt end or start', () => {
    const tracks = makeTracks(2);
    const measurements = {
      [tracks[0]!.id]: cdClean({ everyChannel: { lastSampleDbfs: -6 } }),
      [tracks[1]!.id]: cdClean({ everyChannel: { firstSampleDbfs: -6.1 } }),
    };
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), measurements);
    expect(problems(findings)).toEqual([]);
    const end = findings.find((f) => f.ruleId === 'abruptEnd' && f.trackId === tracks[0]!.id)!;
    expect(end.message).toBe(
      'Channel 1 ends at a gapless join, which the join check judges instead.',
    );
    // With a real gap the same levels are abrupt.
    tracks[1]!.gapBeforeSeconds = 2;
    const withGap = checkRelease(CD_MASTER, makeRelease(tracks), measurements);
    expect(problems(withGap).map(([rule]) => rule)).toEqual([
      'abruptEnd',
      'abruptEnd',
      'abruptStart',
      'abruptStart',
    ]);
  });

  it('warns when a declared gap is doubled by silence inside the files', () => {
    const tracks = makeTracks(2);
    tracks[1]!.gapBeforeSeconds = 2;
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), {
      [tracks[0]!.id]: cdClean({ silence: { tailSeconds: 2.5 } }),
      [tracks[1]!.id]: cdClean({ silence: { headSeconds: 0.6 } }),
    });
    const doubled = findings.find((f) => f.ruleId === 'gapDoubledBySilence')!;
    expect(doubled).toMatchObject({
      severity: 'warning',
      trackId: tracks[1]!.id,
      limit: 2,
      unit: 's',
    });
    expect(doubled.measured).toBeCloseTo(3.1, 9);
    expect(doubled.message).toBe(
      'Besides the declared 2 s gap, the files hold 3.1 s of silence at this join (2.5 s at the end of track 1, 0.6 s at the start of track 2), so listeners hear 5.1 s of silence.',
    );
  });

  it('times vinyl sides separately and gives the level-versus-time guidance', () => {
    const sideA = makeTracks(4, { side: 'A', gapBeforeSeconds: 2 });
    const sideB = makeTracks(3, { side: 'B', gapBeforeSeconds: 2 });
    const measurements = Object.fromEntries([
      ...sideA.map((t) => [t.id, makeMeasurements({ format: { durationSeconds: 328 } })]),
      ...sideB.map((t) => [t.id, makeMeasurements({ format: { durationSeconds: 300 } })]),
    ]);
    const findings = checkRelease(VINYL_12_33, makeRelease([...sideB, ...sideA]), measurements);
    const sides = findings.filter((f) => f.ruleId === 'runningTime');
    expect(sides.map((f) => [f.key, f.severity, f.measured])).toEqual([
      ['vinyl-12-33:runningTime:side-1-A:all', 'warning', 1320],
      ['vinyl-12-33:runningTime:side-1-B:all', 'pass', 906],
    ]);
    expect(sides[0]!.message).toBe(
      'Side A runs 22:00 with gaps, over 20:00; as a guide (common practice), a 12-inch 33⅓ side holds about 20 min at 0 dB, 24 min at −3 dB and 28 min at −6 dB relative to standard reference level, so expect it to be cut about 1.5 dB quieter.',
    );
    const overLong = checkRelease(VINYL_12_33, makeRelease(sideA), {
      ...measurements,
      [sideA[0]!.id]: makeMeasurements({ format: { durationSeconds: 900 } }),
    }).find((f) => f.ruleId === 'runningTime')!;
    expect(overLong).toMatchObject({ severity: 'failure', limit: 1680 });
    expect(overLong.message).toMatch(/over the 28:00 maximum; .* beyond the chart/);
  });

  it('reports out-of-phase bass and a missing composer in trade language', () => {
    const track = makeTrack({ credits: [{ name: 'P. Roducer', role: 'producer' }] });
    const findings = checkReleaseAgainstProfiles(
      [VINYL_12_33, STREAMING_HIRES],
      makeRelease([track]),
      {
        [track.id]: makeMeasurements({ correlation: { lowBand: -0.2 } }),
      },
    );
    expect(findings.find((f) => f.ruleId === 'lowFrequencyCorrelation')!.message).toBe(
      'The channels correlate at −0.20 below 200 Hz, under the 0.00 floor: out-of-phase bass cuts as vertical groove motion and can make the stylus jump.',
    );
    expect(findings.find((f) => f.ruleId === 'requiredCredits')).toMatchObject({
      profileId: 'streaming-hires',
      severity: 'failure',
      message: 'Track 1 has no composer credit; the profile requires composer.',
    });
  });

  it('names the first clipped run and its time', () => {
    const track = makeTrack();
    const findings = checkRelease(VINYL_12_33, makeRelease([track]), {
      [track.id]: makeMeasurements({
        channels: [
          {},
          {
            clipping: {
              runCount: 3,
              longestRunSamples: 7,
              minRunSamples: 1,
              runs: [
                { atSeconds: 42.13, lengthSamples: 2 },
                { atSeconds: 50, lengthSamples: 7 },
                { atSeconds: 61, lengthSamples: 1 },
              ],
            },
          },
        ],
      }),
    });
    const clip = findings.find((f) => f.ruleId === 'clipping' && f.channel === 2)!;
    expect(clip).toMatchObject({
      severity: 'failure',
      measured: 7,
      limit: 1,
      unit: 'samples',
      atSeconds: 42.13,
    });
    expect(clip.message).toBe(
      'Channel 2 clips: 3 runs of 1 or more full-scale samples, the longest 7 samples, the first at 0:42.1.',
    );
  });

  it('places a short-term loudness over at the loudest point of the loudness series', () => {
    const track = makeTrack();
    const profile = {
      ...CD_MASTER,
      rules: { shortTermLoudness: { severity: 'failure' as const, maxLufs: -18 } },
    };
    const [finding] = checkRelease(profile, makeRelease([track]), {
      [track.id]: makeMeasurements({
        loudness: { maxShortTermLufs: -11 },
        series: { loudness: { stepSeconds: 0.5, shortTermLufs: [null, -20, -12, -11, -15] } },
      }),
    });
    expect(finding).toMatchObject({
      severity: 'failure',
      measured: -11,
      limit: -18,
      unit: 'LUFS',
      atSeconds: 1.5,
    });
    expect(finding!.message).toBe(
      'Short-term loudness reaches −11.0 LUFS around 0:01.5, above the −18.0 LUFS maximum.',
    );
  });

  it('reports an ISRC used by another recording elsewhere in the label', () => {
    const track = makeTrack({ isrc: 'QZ9AB2600099', recordingId: 'rec-new-master' });
    const findings = checkRelease(
      STREAMING_HIRES,
      makeRelease([track], { labelIsrcRecordings: { QZ9AB2600099: ['rec-old-master'] } }),
      { [track.id]: makeMeasurements() },
    );
    expect(findings.find((f) => f.ruleId === 'isrcConsistentInLabel')).toMatchObject({
      severity: 'failure',
      message:
        'ISRC QZ-9AB-26-00099 already identifies a different recording elsewhere in the label; one ISRC belongs to one recording for its whole life.',
    });
  });
});

describe('summarizeVerdicts', () => {
  it('gives the worst severity per profile and track, leaving waived warnings out', () => {
    const tracks = makeTracks(2);
    const measurements = {
      [tracks[0]!.id]: cdClean({ loudness: { truePeakDbtp: -0.5 } }),
      [tracks[1]!.id]: cdClean({ format: { sampleRateHz: 48_000 } }),
    };
    const findings = checkRelease(CD_MASTER, makeRelease(tracks), measurements);
    const verdicts = summarizeVerdicts(findings);
    expect(verdicts).toEqual([
      {
        profileId: 'cd-master',
        trackId: tracks[0]!.id,
        severity: 'warning',
        failures: 0,
        warnings: 1,
      },
      {
        profileId: 'cd-master',
        trackId: tracks[1]!.id,
        severity: 'failure',
        failures: 1,
        warnings: 0,
      },
      { profileId: 'cd-master', trackId: null, severity: 'pass', failures: 0, warnings: 0 },
    ]);
    const waived = new Set([`cd-master:truePeak:${tracks[0]!.id}:all`]);
    expect(summarizeVerdicts(findings, waived)[0]).toMatchObject({ severity: 'pass', warnings: 0 });
  });
});

describe('figures beside their limit', () => {
  it('shows enough decimals that a value breaking the limit never looks equal to it', async () => {
    const { formatFigureAgainst } = await import('@/lib/specs/finding');
    expect(formatFigureAgainst(-0.96, -1)).toBe('−0.96');
    expect(formatFigureAgainst(-1.04, -1)).toBe('−1.04');
    expect(formatFigureAgainst(-0.996, -1)).toBe('−0.996');
    expect(formatFigureAgainst(-3.2, -1)).toBe('−3.2');
    expect(formatFigureAgainst(-1, -1)).toBe('−1.0');
  });
});
