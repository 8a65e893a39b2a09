import type { AudioMeasurements } from '../audio/types';
import type { RuleId } from './schema';

/** Roles a credit can carry; the form offers these, the checks accept any string. */
export const CREDIT_ROLES = [
  'composer',
  'lyricist',
  'arranger',
  'producer',
  'recording-engineer',
  'mixing-engineer',
  'mastering-engineer',
  'performer',
  'featured-artist',
  'remixer',
  'publisher',
] as const;
export type CreditRole = (typeof CREDIT_ROLES)[number];

export interface CreditForCheck {
  name: string;
  /** One of CREDIT_ROLES for built-in profiles; custom profiles may require other roles. */
  role: string;
  isni?: string | null;
}

/** One track as the checks see it: order, identifiers, credits and declared gap. */
export interface TrackForCheck {
  id: string;
  /** The recording this track plays; two tracks with one ISRC must share it. */
  recordingId: string;
  /** 1-based order within its disc (or side). */
  position: number;
  /** 1-based disc number. */
  disc: number;
  /** Vinyl side ("A", "B", …); null for digital and CD. */
  side: string | null;
  title: string;
  isrc: string | null;
  credits: CreditForCheck[];
  /** Declared silence before the track, seconds (the pre-gap for the first track on a CD). */
  gapBeforeSeconds: number;
  explicit: boolean;
}

export interface ArtworkForCheck {
  widthPx: number;
  heightPx: number;
  /** Lower case: 'jpeg', 'png', … ('jpg' is read as 'jpeg'). */
  format: string;
}

/** A release as the checks see it; built by the server from its rows, nothing else. */
export interface ReleaseForCheck {
  id: string;
  title: string;
  /** UPC-A or EAN-13 as entered; null when missing. */
  barcode: string | null;
  tracks: TrackForCheck[];
  artwork: ArtworkForCheck | null;
  /**
   * ISRCs used elsewhere in the label (other releases), stored form → the recording ids
   * that carry it. A different recording under the same ISRC is a conflict.
   */
  labelIsrcRecordings: Readonly<Record<string, readonly string[]>>;
}

/** Per-track measurements by track id; a missing or null entry means no audio analysed yet. */
export type MeasurementsByTrack = Readonly<Record<string, AudioMeasurements | null | undefined>>;

export type FindingSeverity = 'pass' | 'warning' | 'failure';

/** One verdict of one rule of one profile on one track (or on the release). */
export interface Finding {
  /** Stable across runs: profile, rule, track and channel. Waivers refer to it. */
  key: string;
  ruleId: RuleId;
  profileId: string;
  severity: FindingSeverity;
  /** null for a release-level finding. */
  trackId: string | null;
  /** 1-based channel for per-channel rules, else null. */
  channel: number | null;
  /** What was found; null when it could not be measured (no audio, silence). */
  measured: number | string | null;
  /** The limit it was judged against, in the same unit. */
  limit: number | string | null;
  unit: string;
  /** One plain sentence in the trade's words. */
  message: string;
  /** Seconds from the start of the track's file, where the finding has a place. */
  atSeconds?: number;
}
