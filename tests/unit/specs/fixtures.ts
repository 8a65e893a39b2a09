import type { AudioMeasurements, ChannelMeasurement } from '@/lib/audio/types';
import type { ReleaseForCheck, TrackForCheck } from '@/lib/specs';

export interface MeasurementOverrides {
  format?: Partial<AudioMeasurements['format']>;
  loudness?: Partial<AudioMeasurements['loudness']>;
  silence?: Partial<AudioMeasurements['silence']>;
  correlation?: Partial<AudioMeasurements['correlation']>;
  cdFrames?: Partial<AudioMeasurements['cdFrames']>;
  tags?: AudioMeasurements['tags'];
  /** Overrides per channel index; the channel count follows format.channels (default 2). */
  channels?: Partial<ChannelMeasurement>[];
  /** Applied to every channel before the per-channel overrides. */
  everyChannel?: Partial<ChannelMeasurement>;
  series?: Partial<AudioMeasurements['series']>;
}

/**
 * A clean, compliant-looking measurement of a 3-minute 44.1 kHz / 24-bit stereo WAV
 * (−14 LUFS, −1.5 dBTP, no clipping, short fades, frame-aligned), with overrides.
 */
export function makeMeasurements(overrides: MeasurementOverrides = {}): AudioMeasurements {
  const format: AudioMeasurements['format'] = {
    container: 'wav',
    encoding: 'pcm-int',
    sampleRateHz: 44_100,
    channels: 2,
    bitsPerSample: 24,
    durationSamples: 180 * 44_100,
    durationSeconds: 180,
    dataBytes: 180 * 44_100 * 6,
    ...overrides.format,
  };
  const channels = Array.from(
    { length: format.channels },
    (_, i): ChannelMeasurement => ({
      samplePeakDbfs: -2,
      truePeakDbtp: -1.5,
      truePeakAtSeconds: 61.25,
      dcOffset: 0,
      clipping: { runCount: 0, longestRunSamples: 0, minRunSamples: 1, runs: [] },
      firstSampleDbfs: null,
      lastSampleDbfs: null,
      effectiveBitDepth: format.bitsPerSample,
      ...overrides.everyChannel,
      ...overrides.channels?.[i],
    }),
  );
  return {
    engineVersion: 'test',
    format,
    tags: overrides.tags ?? {},
    loudness: {
      integratedLufs: -14,
      rangeLu: 6,
      maxMomentaryLufs: -9,
      maxShortTermLufs: -11,
      truePeakDbtp: -1.5,
      truePeakAtSeconds: 61.25,
      samplePeakDbfs: -2,
      ...overrides.loudness,
    },
    channels,
    silence: { thresholdDbfs: -60, headSeconds: 0.05, tailSeconds: 0.5, ...overrides.silence },
    correlation: {
      fullBand: 0.6,
      lowBand: 0.9,
      lowBandHz: 200,
      identicalChannels: false,
      invertedChannels: false,
      ...overrides.correlation,
    },
    cdFrames: {
      frames: Math.floor(format.durationSamples / 588),
      remainderSamples: format.durationSamples % 588,
      ...overrides.cdFrames,
    },
    series: {
      loudness: { stepSeconds: 1, shortTermLufs: [-20, -12, -11, -15] },
      waveform: { pointSeconds: 1, min: [], max: [] },
      ...overrides.series,
    },
  };
}

let counter = 0;

/** A track with a composer credit, a well-formed ISRC and no gap, with overrides. */
export function makeTrack(overrides: Partial<TrackForCheck> = {}): TrackForCheck {
  counter += 1;
  const position = overrides.position ?? 1;
  return {
    id: `trk-${position}-${counter}`,
    recordingId: `rec-${counter}`,
    position,
    disc: 1,
    side: null,
    title: `Track ${position}`,
    isrc: `QZ9AB26${String(counter).padStart(5, '0')}`,
    credits: [{ name: 'A. Writer', role: 'composer' }],
    gapBeforeSeconds: 0,
    explicit: false,
    ...overrides,
  };
}

/** `count` tracks at positions 1…count; the first gets a 2 s pre-gap. */
export function makeTracks(count: number, overrides: Partial<TrackForCheck> = {}): TrackForCheck[] {
  return Array.from({ length: count }, (_, i) =>
    makeTrack({ position: i + 1, gapBeforeSeconds: i === 0 ? 2 : 0, ...overrides }),
  );
}

/** A release with a valid EAN-13, 3000 px square JPEG artwork and the given tracks. */
export function makeRelease(
  tracks: TrackForCheck[],
  overrides: Partial<ReleaseForCheck> = {},
): ReleaseForCheck {
  return {
    id: 'rel-1',
    title: 'Harbour Lights',
    // GS1 India worked example, 890400021003 → check digit 7.
    barcode: '8904000210037',
    tracks,
    artwork: { widthPx: 3000, heightPx: 3000, format: 'jpeg' },
    labelIsrcRecordings: {},
    ...overrides,
  };
}
