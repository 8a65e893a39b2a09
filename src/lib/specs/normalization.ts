import type { MeasurementsByTrack, ReleaseForCheck } from './types';

export interface NormalizationReference {
  referenceLufs: number;
  source: string;
}

/** Playback reference levels shown beside the findings. */
export const NORMALIZATION_REFERENCES: readonly NormalizationReference[] = [
  // Common practice for streaming players that normalise loudness.
  { referenceLufs: -14, source: 'common practice for streaming players' },
  // AES TD1008 (2021): music normalised per track to −16 LUFS (REFERENCES §3, second-hand).
  { referenceLufs: -16, source: 'AES TD1008' },
];

// AES TD1004/TD1008 maximum true peak, −1 dBTP (REFERENCES §3, from memory).
const DEFAULT_CEILING_DBTP = -1;

export interface NormalizedLevel {
  /** Integrated loudness as measured; null when unknown (no audio) or unmeasurable. */
  integratedLufs: number | null;
  /** Gain the player applies, dB (negative turns down); null when loudness is unknown. */
  gainDb: number | null;
  /** True peak after that gain, dBTP; null when unknown. */
  truePeakAfterDbtp: number | null;
  /** A player that raises quiet tracks would push the true peak over the ceiling. */
  exceedsCeiling: boolean;
}

export interface NormalizationPreview {
  referenceLufs: number;
  source: string;
  ceilingDbtp: number;
  tracks: ({ trackId: string } & NormalizedLevel)[];
  /** Album mode: one gain for the whole release, from the album's loudness. */
  album: NormalizedLevel;
}

/**
 * What loudness-normalising players would do to each track and to the album, at each
 * reference level. Album loudness is the duration-weighted power mean of the tracks'
 * integrated loudness, an approximation of gating the whole album at once. Only positive
 * gain can push a peak over the ceiling: players turn loud masters down, never up past it.
 */
export function previewNormalization(
  release: ReleaseForCheck,
  measurementsByTrack: MeasurementsByTrack,
  references: readonly NormalizationReference[] = NORMALIZATION_REFERENCES,
  ceilingDbtp: number = DEFAULT_CEILING_DBTP,
): NormalizationPreview[] {
  const tracks = release.tracks.map((track) => {
    const m = measurementsByTrack[track.id];
    return {
      trackId: track.id,
      integratedLufs: m?.loudness.integratedLufs ?? null,
      truePeakDbtp: m?.loudness.truePeakDbtp ?? null,
      durationSeconds: m?.format.durationSeconds ?? 0,
    };
  });
  const known = tracks.filter((t) => t.integratedLufs !== null && t.durationSeconds > 0);
  const complete = known.length === tracks.length && tracks.length > 0;
  const totalSeconds = known.reduce((sum, t) => sum + t.durationSeconds, 0);
  const albumLufs = complete
    ? 10 *
      Math.log10(
        known.reduce((sum, t) => sum + t.durationSeconds * 10 ** (t.integratedLufs! / 10), 0) /
          totalSeconds,
      )
    : null;
  const albumPeak = complete
    ? tracks.reduce<number | null>(
        (max, t) =>
          t.truePeakDbtp === null
            ? max
            : max === null
              ? t.truePeakDbtp
              : Math.max(max, t.truePeakDbtp),
        null,
      )
    : null;

  return references.map(({ referenceLufs, source }) => ({
    referenceLufs,
    source,
    ceilingDbtp,
    tracks: tracks.map((t) => ({
      trackId: t.trackId,
      ...applyGain(t.integratedLufs, t.truePeakDbtp, referenceLufs, ceilingDbtp),
    })),
    album: applyGain(albumLufs, albumPeak, referenceLufs, ceilingDbtp),
  }));
}

function applyGain(
  integratedLufs: number | null,
  truePeakDbtp: number | null,
  referenceLufs: number,
  ceilingDbtp: number,
): NormalizedLevel {
  if (integratedLufs === null) {
    return { integratedLufs: null, gainDb: null, truePeakAfterDbtp: null, exceedsCeiling: false };
  }
  const gainDb = referenceLufs - integratedLufs;
  const truePeakAfterDbtp = truePeakDbtp === null ? null : truePeakDbtp + gainDb;
  return {
    integratedLufs,
    gainDb,
    truePeakAfterDbtp,
    exceedsCeiling: gainDb > 0 && truePeakAfterDbtp !== null && truePeakAfterDbtp > ceilingDbtp,
  };
}
