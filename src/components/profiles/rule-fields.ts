/**
 * How each rule of a delivery profile is edited: its fields, their kind and unit. The form
 * is validated by deliveryRulesSchema itself; this table only lays it out.
 */
import type { RuleId } from '@/lib/specs/schema';

export type FieldKind = 'number' | 'integer' | 'numbers' | 'strings' | 'boolean' | 'choice';

export interface RuleField {
  name: string;
  label: string;
  kind: FieldKind;
  unit?: string;
  optional?: boolean;
  choices?: readonly string[];
  hint?: string;
}

export interface RuleGroup {
  title: string;
  rules: RuleId[];
}

const range = (unit: string): RuleField[] => [
  { name: 'minSeconds', label: 'At least', kind: 'number', unit, optional: true },
  { name: 'maxSeconds', label: 'At most', kind: 'number', unit, optional: true },
];

export const ruleFields: Record<RuleId, RuleField[]> = {
  container: [
    { name: 'allowed', label: 'Containers', kind: 'strings', hint: 'e.g. wav, bwf, rf64, aiff' },
    {
      name: 'encodings',
      label: 'Encodings',
      kind: 'strings',
      optional: true,
      hint: 'pcm-int, pcm-float',
    },
  ],
  sampleRate: [{ name: 'allowedHz', label: 'Sample rates', kind: 'numbers', unit: 'Hz' }],
  bitDepth: [{ name: 'allowedBits', label: 'Bit depths', kind: 'numbers', unit: 'bits' }],
  effectiveBitDepth: [{ name: 'minBits', label: 'At least', kind: 'integer', unit: 'bits in use' }],
  channelCount: [{ name: 'allowed', label: 'Channel counts', kind: 'numbers' }],
  samplePeak: [{ name: 'ceilingDbfs', label: 'Ceiling', kind: 'number', unit: 'dBFS' }],
  truePeak: [{ name: 'ceilingDbtp', label: 'Ceiling', kind: 'number', unit: 'dBTP' }],
  integratedLoudness: [
    { name: 'targetLufs', label: 'Target', kind: 'number', unit: 'LUFS', optional: true },
    { name: 'toleranceLu', label: '±', kind: 'number', unit: 'LU', optional: true },
    { name: 'minLufs', label: 'At least', kind: 'number', unit: 'LUFS', optional: true },
    { name: 'maxLufs', label: 'At most', kind: 'number', unit: 'LUFS', optional: true },
  ],
  loudnessRange: [
    { name: 'minLu', label: 'At least', kind: 'number', unit: 'LU', optional: true },
    { name: 'maxLu', label: 'At most', kind: 'number', unit: 'LU', optional: true },
  ],
  shortTermLoudness: [{ name: 'maxLufs', label: 'At most', kind: 'number', unit: 'LUFS' }],
  dcOffset: [{ name: 'maxPercent', label: 'At most', kind: 'number', unit: '% of full scale' }],
  clipping: [
    { name: 'minRunSamples', label: 'A run of at least', kind: 'integer', unit: 'samples' },
  ],
  headSilence: range('s'),
  tailSilence: range('s'),
  abruptStart: [
    { name: 'maxLevelDbfs', label: 'First sample at most', kind: 'number', unit: 'dBFS' },
  ],
  abruptEnd: [{ name: 'maxLevelDbfs', label: 'Last sample at most', kind: 'number', unit: 'dBFS' }],
  identicalChannels: [],
  invertedChannels: [],
  lowFrequencyCorrelation: [
    { name: 'minCorrelation', label: 'At least', kind: 'number', unit: '(−1…+1)' },
    { name: 'warnBelow', label: 'Warn below', kind: 'number', unit: '(−1…+1)', optional: true },
  ],
  trackDuration: range('s'),
  trackCount: [{ name: 'max', label: 'At most', kind: 'integer', unit: 'tracks' }],
  runningTime: [
    { name: 'scope', label: 'Per', kind: 'choice', choices: ['release', 'disc', 'side'] },
    { name: 'maxSeconds', label: 'At most', kind: 'number', unit: 's' },
    { name: 'warnAboveSeconds', label: 'Warn above', kind: 'number', unit: 's', optional: true },
    {
      name: 'vinylFormat',
      label: 'Vinyl format',
      kind: 'choice',
      choices: ['12-33', '12-45', '7-45'],
      optional: true,
    },
  ],
  firstTrackPreGap: range('s'),
  gapBetweenTracks: range('s'),
  gapWholeCdFrames: [],
  lengthWholeCdFrames: [],
  gaplessJoin: [
    { name: 'maxStepDbfs', label: 'Level step at most', kind: 'number', unit: 'dBFS' },
    { name: 'maxSilenceSeconds', label: 'Silence at most', kind: 'number', unit: 's' },
  ],
  gapDoubledBySilence: [
    { name: 'maxSilenceSeconds', label: 'Silence at most', kind: 'number', unit: 's' },
  ],
  isrcPresent: [],
  isrcValid: [],
  isrcUniqueInRelease: [],
  isrcConsistentInLabel: [],
  barcode: [],
  requiredCredits: [
    { name: 'roles', label: 'Roles', kind: 'strings', hint: 'e.g. composer, producer' },
  ],
  artwork: [
    { name: 'minWidthPx', label: 'Width at least', kind: 'integer', unit: 'px' },
    { name: 'minHeightPx', label: 'Height at least', kind: 'integer', unit: 'px' },
    { name: 'formats', label: 'Formats', kind: 'strings', hint: 'e.g. jpeg, png' },
    { name: 'square', label: 'Must be square', kind: 'boolean' },
  ],
};

export const ruleGroups: RuleGroup[] = [
  {
    title: 'File format',
    rules: ['container', 'sampleRate', 'bitDepth', 'effectiveBitDepth', 'channelCount'],
  },
  {
    title: 'Levels and loudness',
    rules: [
      'samplePeak',
      'truePeak',
      'integratedLoudness',
      'loudnessRange',
      'shortTermLoudness',
      'dcOffset',
      'clipping',
    ],
  },
  {
    title: 'Edges and channels',
    rules: [
      'headSilence',
      'tailSilence',
      'abruptStart',
      'abruptEnd',
      'identicalChannels',
      'invertedChannels',
      'lowFrequencyCorrelation',
    ],
  },
  {
    title: 'Running order and gaps',
    rules: [
      'trackDuration',
      'trackCount',
      'runningTime',
      'firstTrackPreGap',
      'gapBetweenTracks',
      'gapWholeCdFrames',
      'lengthWholeCdFrames',
      'gaplessJoin',
      'gapDoubledBySilence',
    ],
  },
  {
    title: 'Identifiers and metadata',
    rules: [
      'isrcPresent',
      'isrcValid',
      'isrcUniqueInRelease',
      'isrcConsistentInLabel',
      'barcode',
      'requiredCredits',
      'artwork',
    ],
  },
];
