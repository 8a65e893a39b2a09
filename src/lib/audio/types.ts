/**
 * The contract between the audio engine (src/lib/audio) and everything that reads its
 * results: the delivery checks (src/lib/specs), the database (audio_files.measurements
 * JSON), the plots and the command-line tool.
 *
 * Units are in the names. A level that does not exist (silence, an empty file) is `null`,
 * never a magic number such as -70 or -Infinity, so it survives JSON.
 */

/** Container and sample-format facts read from the file header. */
export interface AudioFormat {
  /** 'wav' | 'bwf' | 'rf64' | 'bw64' | 'aiff' | 'aifc' | 'flac' | … (lower case). */
  container: string;
  /** 'pcm-int' | 'pcm-float' for the formats we decode. */
  encoding: 'pcm-int' | 'pcm-float';
  sampleRateHz: number;
  channels: number;
  /** Bits per sample as stored (16, 24, 32, 64). */
  bitsPerSample: number;
  /** Duration in sample frames (one frame = one sample per channel). */
  durationSamples: number;
  durationSeconds: number;
  /** Byte length of the audio data. */
  dataBytes: number;
}

/** Broadcast WAVE and tag metadata found in the file (all optional). */
export interface AudioTags {
  bext?: {
    description: string;
    originator: string;
    originatorReference: string;
    originationDate: string;
    originationTime: string;
    timeReferenceSamples: number;
    version: number;
    umid?: string;
    loudnessValueLufs?: number | null;
    loudnessRangeLu?: number | null;
    maxTruePeakDbtp?: number | null;
    maxMomentaryLufs?: number | null;
    maxShortTermLufs?: number | null;
    codingHistory: string;
  };
  /** ISRC from an ID3v2 TSRC frame (never from RIFF INFO ISRC, which means "source"). */
  isrc?: string;
  /** Other text tags by name (INFO, ID3, iXML, AIFF NAME/AUTH…), as found. */
  text?: Record<string, string>;
}

export interface ChannelMeasurement {
  /** Highest absolute sample value in dBFS; null for digital silence. */
  samplePeakDbfs: number | null;
  /** Highest inter-sample peak in dBTP (BS.1770 Annex 2); null for silence. */
  truePeakDbtp: number | null;
  /** Time of the highest true peak, seconds from the start of the file. */
  truePeakAtSeconds: number | null;
  /** Mean sample value as a fraction of full scale (signed). */
  dcOffset: number;
  clipping: ClippingSummary;
  /** Absolute value of the first and last sample, dBFS (null when exactly 0). */
  firstSampleDbfs: number | null;
  lastSampleDbfs: number | null;
  /** Bits that actually vary: a 24-bit file whose low 8 bits are always zero reports 16. */
  effectiveBitDepth: number;
}

export interface ClippingSummary {
  /** Runs of consecutive samples at (or within one LSB of) full scale, length ≥ minRunSamples. */
  runCount: number;
  longestRunSamples: number;
  /** Run length counted as clipping (samples). */
  minRunSamples: number;
  /** The first few runs (at most 50), for finding markers. */
  runs: { atSeconds: number; lengthSamples: number }[];
}

export interface LoudnessMeasurement {
  /** Integrated loudness, LUFS (BS.1770 gating); null when every block is gated out. */
  integratedLufs: number | null;
  /** Loudness range, LU (EBU Tech 3342); null when too few blocks survive the gates. */
  rangeLu: number | null;
  maxMomentaryLufs: number | null;
  maxShortTermLufs: number | null;
  /** Highest true peak over all channels, dBTP, and where it is. */
  truePeakDbtp: number | null;
  truePeakAtSeconds: number | null;
  samplePeakDbfs: number | null;
}

export interface SilenceMeasurement {
  /** Threshold used, dBFS (a sample below it in every channel counts as silent). */
  thresholdDbfs: number;
  headSeconds: number;
  tailSeconds: number;
}

export interface CorrelationMeasurement {
  /** Pearson correlation of the first two channels over the whole file, −1…+1; null for mono. */
  fullBand: number | null;
  /** Same after a low-pass near lowBandHz (vinyl checks); null for mono. */
  lowBand: number | null;
  lowBandHz: number;
  /** Channel 2 equals channel 1 sample for sample. */
  identicalChannels: boolean;
  /** Channel 2 equals −channel 1 sample for sample. */
  invertedChannels: boolean;
}

export interface CdFrames {
  /** Whole CD frames of 588 samples (at 44.1 kHz; at other rates the count is per 1/75 s). */
  frames: number;
  /** Samples left over after the last whole frame; 0 means the length is frame-aligned. */
  remainderSamples: number;
}

/** Series for plots. */
export interface PlotSeries {
  /** Short-term loudness every `stepSeconds`, LUFS (null where silent). */
  loudness: { stepSeconds: number; shortTermLufs: (number | null)[] };
  /** Min/max waveform overview (~2000 points), all channels mixed to their extreme values. */
  waveform: { pointSeconds: number; min: number[]; max: number[] };
}

export interface AudioMeasurements {
  /** Version of the measuring code; bump when a measurement changes meaning. */
  engineVersion: string;
  format: AudioFormat;
  tags: AudioTags;
  loudness: LoudnessMeasurement;
  channels: ChannelMeasurement[];
  silence: SilenceMeasurement;
  correlation: CorrelationMeasurement;
  cdFrames: CdFrames;
  series: PlotSeries;
}
