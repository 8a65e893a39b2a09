import { type DeliveryProfile, type DeliveryRules, deliveryProfileSchema } from './schema';

// Values shared by several profiles. Sources: REFERENCES.md, section given beside each.

/** Sample rates from CD rate up to 192 kHz, the "44.1–192 kHz" of a high-resolution store. */
const HIGH_RES_RATES_HZ = [44_100, 48_000, 88_200, 96_000, 176_400, 192_000];

const LOSSLESS_CONTAINERS = ['wav', 'bwf', 'rf64', 'bw64', 'aiff', 'aifc', 'flac'];
const UNCOMPRESSED_CONTAINERS = ['wav', 'bwf', 'rf64', 'bw64', 'aiff', 'aifc'];

/** Metadata every digital store asks for. */
const STORE_METADATA: DeliveryRules = {
  // ISO 3901: one ISRC per distinct recording, well formed, never shared (REFERENCES §4).
  isrcPresent: { severity: 'failure' },
  isrcValid: { severity: 'failure' },
  isrcUniqueInRelease: { severity: 'failure' },
  isrcConsistentInLabel: { severity: 'failure' },
  // GS1: UPC-A or EAN-13 with a correct check digit (REFERENCES §5).
  barcode: { severity: 'failure' },
  // Composer credits on every track: common distributor practice.
  requiredCredits: { severity: 'failure', roles: ['composer'] },
  // JPEG or PNG, square, at least 3000 × 3000 px: common distributor practice (issue 5).
  artwork: {
    severity: 'failure',
    minWidthPx: 3000,
    minHeightPx: 3000,
    formats: ['jpeg', 'png'],
    square: true,
  },
};

/** Audio hygiene for a finished master: all common practice, all warnings. */
const FINISHED_MASTER_HYGIENE: DeliveryRules = {
  // AES TD1004/TD1008 maximum true peak −1 dBTP (REFERENCES §3, from memory): leaves room
  // for lossy encoding and for players that raise quiet tracks.
  truePeak: { severity: 'warning', ceilingDbtp: -1 },
  // Three consecutive full-scale samples as the mark of clipping: common practice.
  clipping: { severity: 'warning', minRunSamples: 3 },
  // 0.1 % of full scale (−60 dBFS) of DC offset: common practice.
  dcOffset: { severity: 'warning', maxPercent: 0.1 },
  // A first or last sample above −40 dBFS clicks on play or stop: common practice.
  abruptStart: { severity: 'warning', maxLevelDbfs: -40 },
  abruptEnd: { severity: 'warning', maxLevelDbfs: -40 },
  // Mono in a stereo file, or one channel inverted: common practice.
  identicalChannels: { severity: 'warning' },
  invertedChannels: { severity: 'warning' },
  // A gapless join steps by no more than −40 dBFS and holds under 0.5 s of silence; a
  // declared gap is not lengthened by more than 2 s of silence in the files: common practice.
  gaplessJoin: { severity: 'warning', maxStepDbfs: -40, maxSilenceSeconds: 0.5 },
  gapDoubledBySilence: { severity: 'warning', maxSilenceSeconds: 2 },
};

/** Streaming and download, high resolution: 24-bit PCM at 44.1–192 kHz (PRODUCT.md). */
export const STREAMING_HIRES: DeliveryProfile = {
  id: 'streaming-hires',
  name: 'Streaming and download, high resolution',
  description:
    '24-bit PCM at 44.1 to 192 kHz, stereo, lossless container, with full store metadata. A starting point: check each store’s current specification.',
  version: 1,
  rules: {
    container: { severity: 'failure', allowed: LOSSLESS_CONTAINERS, encodings: ['pcm-int'] },
    sampleRate: { severity: 'failure', allowedHz: HIGH_RES_RATES_HZ },
    bitDepth: { severity: 'failure', allowedBits: [24] },
    // A "24-bit" file whose low 8 bits never change is 16-bit audio: common store practice.
    effectiveBitDepth: { severity: 'failure', minBits: 17 },
    channelCount: { severity: 'failure', allowed: [2] },
    ...FINISHED_MASTER_HYGIENE,
    ...STORE_METADATA,
  },
};

/** Streaming and download, standard resolution: 16/24-bit at 44.1/48 kHz (PRODUCT.md). */
export const STREAMING_STANDARD: DeliveryProfile = {
  id: 'streaming-standard',
  name: 'Streaming and download, standard',
  description:
    '16- or 24-bit PCM at 44.1 or 48 kHz, stereo, lossless container, with full store metadata. A starting point: check each store’s current specification.',
  version: 1,
  rules: {
    container: { severity: 'failure', allowed: LOSSLESS_CONTAINERS, encodings: ['pcm-int'] },
    sampleRate: { severity: 'failure', allowedHz: [44_100, 48_000] },
    bitDepth: { severity: 'failure', allowedBits: [16, 24] },
    channelCount: { severity: 'failure', allowed: [2] },
    ...FINISHED_MASTER_HYGIENE,
    ...STORE_METADATA,
  },
};

/** Compact Disc production master (IEC 60908 / Red Book, REFERENCES §6). */
export const CD_MASTER: DeliveryProfile = {
  id: 'cd-master',
  name: 'Compact Disc production master',
  description:
    '16-bit / 44.1 kHz stereo, at most 99 tracks of at least 4 s, a 2 s pre-gap before track 1, gaps and lengths in whole CD frames, within the playing time of the disc.',
  version: 1,
  rules: {
    container: { severity: 'failure', allowed: UNCOMPRESSED_CONTAINERS, encodings: ['pcm-int'] },
    // IEC 60908: 44.1 kHz, 16-bit signed PCM, 2 channels (REFERENCES §6).
    sampleRate: { severity: 'failure', allowedHz: [44_100] },
    bitDepth: { severity: 'failure', allowedBits: [16] },
    channelCount: { severity: 'failure', allowed: [2] },
    // IEC 60908: up to 99 tracks per disc, each at least 4 s (REFERENCES §6).
    trackCount: { severity: 'failure', max: 99 },
    trackDuration: { severity: 'failure', minSeconds: 4 },
    // IEC 60908: 74 min in the original specification (333,000 sectors); 79.8 min is the
    // commonly quoted practical maximum on 80-minute media (REFERENCES §6).
    runningTime: {
      severity: 'failure',
      scope: 'disc',
      maxSeconds: 79.8 * 60,
      warnAboveSeconds: 74 * 60,
    },
    // MMC-5 §4.2.3.5.2 / IEC 60908: a 2 s (150-sector) pre-gap before track 1 (REFERENCES §6).
    firstTrackPreGap: { severity: 'failure', minSeconds: 2 },
    // IEC 60908: 75 sectors per second, so gaps are whole 1/75 s frames (REFERENCES §6).
    gapWholeCdFrames: { severity: 'failure' },
    // Tracks padded to a multiple of 588 samples (REFERENCES §6, from memory / computed).
    lengthWholeCdFrames: { severity: 'warning' },
    ...FINISHED_MASTER_HYGIENE,
    // ISO 3901 ISRCs go into subcode Q mode 3 per track; optional on a disc, so warnings
    // for a missing one, failures for a wrong or shared one (REFERENCES §4, §6).
    isrcPresent: { severity: 'warning' },
    isrcValid: { severity: 'failure' },
    isrcUniqueInRelease: { severity: 'failure' },
    isrcConsistentInLabel: { severity: 'failure' },
    // The MCN in subcode Q mode 2 is a 13-digit UPC/EAN (GS1; REFERENCES §5, §6); optional.
    barcode: { severity: 'warning' },
  },
};

/** Vinyl pre-master rules shared by every disc size and speed (REFERENCES §9, common practice). */
function buildVinylRules(
  format: '12-33' | '12-45' | '7-45',
  minutes: { warnAbove: number; max: number },
): DeliveryRules {
  return {
    // WAV or AIFF, 24-bit (or 32-bit float) at the native sample rate (REFERENCES §9).
    container: { severity: 'failure', allowed: UNCOMPRESSED_CONTAINERS },
    sampleRate: { severity: 'failure', allowedHz: HIGH_RES_RATES_HZ },
    bitDepth: { severity: 'failure', allowedBits: [24, 32] },
    channelCount: { severity: 'failure', allowed: [2] },
    // Peaks at or below −1 dBFS is a common request (REFERENCES §9).
    samplePeak: { severity: 'warning', ceilingDbfs: -1 },
    // No master-bus limiting or clipping (REFERENCES §9): any full-scale sample counts.
    clipping: { severity: 'failure', minRunSamples: 1 },
    // Loudness no higher than about −10 to −12 LUFS (REFERENCES §9): warn above −10.
    integratedLoudness: { severity: 'warning', maxLufs: -10 },
    // Low-frequency correlation 0.5 to +1, never negative (REFERENCES §9).
    lowFrequencyCorrelation: { severity: 'failure', minCorrelation: 0, warnBelow: 0.5 },
    // Out-of-phase channels cut as pure vertical modulation (REFERENCES §9).
    invertedChannels: { severity: 'failure' },
    dcOffset: { severity: 'warning', maxPercent: 0.1 },
    // Side lengths at standard reference level (REFERENCES §9, lossenderosstudio.com chart):
    // warn past the full-level length, fail past the chart's longest length.
    runningTime: {
      severity: 'failure',
      scope: 'side',
      maxSeconds: minutes.max * 60,
      warnAboveSeconds: minutes.warnAbove * 60,
      vinylFormat: format,
    },
    gaplessJoin: { severity: 'warning', maxStepDbfs: -40, maxSilenceSeconds: 0.5 },
  };
}

/** Vinyl pre-master, 12-inch at 33⅓ rpm: 20 min per side at full level, 28 min at −6 dB. */
export const VINYL_12_33: DeliveryProfile = {
  id: 'vinyl-12-33',
  name: 'Vinyl pre-master, 12-inch 33⅓',
  description:
    '24-bit WAV or AIFF at the native rate, no clipping, peaks at or below −1 dBFS, bass in phase, tracks assigned to sides of about 20 minutes (up to 28 minutes at reduced level). Common cutting practice.',
  version: 1,
  // REFERENCES §9: 20 min at 0 dB, 28 min at −6 dB.
  rules: buildVinylRules('12-33', { warnAbove: 20, max: 28 }),
};

/** Vinyl pre-master, 12-inch at 45 rpm: 13.5 min per side at full level, 16 min at −3 dB. */
export const VINYL_12_45: DeliveryProfile = {
  id: 'vinyl-12-45',
  name: 'Vinyl pre-master, 12-inch 45',
  description:
    '24-bit WAV or AIFF at the native rate, no clipping, peaks at or below −1 dBFS, bass in phase, tracks assigned to sides of about 13½ minutes (up to 16 minutes at reduced level). Common cutting practice.',
  version: 1,
  // REFERENCES §9: 13.5 min at 0 dB, 16 min at −3 dB.
  rules: buildVinylRules('12-45', { warnAbove: 13.5, max: 16 }),
};

/** Vinyl pre-master, 7-inch at 45 rpm: 5 min per side at full level, 6 min at −3 dB. */
export const VINYL_7_45: DeliveryProfile = {
  id: 'vinyl-7-45',
  name: 'Vinyl pre-master, 7-inch 45',
  description:
    '24-bit WAV or AIFF at the native rate, no clipping, peaks at or below −1 dBFS, bass in phase, sides of about 5 minutes (up to 6 minutes at reduced level). Common cutting practice.',
  version: 1,
  // REFERENCES §9: 5 min at 0 dB, 6 min at −3 dB.
  rules: buildVinylRules('7-45', { warnAbove: 5, max: 6 }),
};

/** Broadcast delivery to EBU R 128 (REFERENCES §3). */
export const BROADCAST_R128: DeliveryProfile = {
  id: 'broadcast-r128',
  name: 'Broadcast, EBU R 128',
  description:
    'Programme loudness −23 LUFS ± 1 LU, true peak at most −1 dBTP, 48 kHz PCM. Check the broadcaster’s own delivery notes for tolerances and file format.',
  version: 1,
  rules: {
    container: { severity: 'failure', allowed: UNCOMPRESSED_CONTAINERS, encodings: ['pcm-int'] },
    // 48 kHz, 24-bit broadcast files: common practice.
    sampleRate: { severity: 'failure', allowedHz: [48_000] },
    bitDepth: { severity: 'warning', allowedBits: [24] },
    // EBU R 128: target −23.0 LUFS; production tolerance ±1 LU in v4.0 (2020) (REFERENCES §3).
    integratedLoudness: { severity: 'failure', targetLufs: -23, toleranceLu: 1 },
    // EBU R 128: maximum permitted true peak −1 dBTP (REFERENCES §3).
    truePeak: { severity: 'failure', ceilingDbtp: -1 },
    clipping: { severity: 'failure', minRunSamples: 3 },
    invertedChannels: { severity: 'warning' },
    isrcValid: { severity: 'warning' },
  },
};

/** Pre-limiter master for a final limiting stage or cutting: ~5 dB headroom, no clipping (common practice). */
export const PRE_LIMITER: DeliveryProfile = {
  id: 'pre-limiter',
  name: 'Pre-limiter master',
  description:
    'A master that goes on to a final limiting stage or to cutting: about 5 dB of peak headroom and never a clipped sample, at 24-bit or 32-bit float. Common mastering practice.',
  version: 1,
  rules: {
    container: { severity: 'failure', allowed: UNCOMPRESSED_CONTAINERS },
    sampleRate: { severity: 'failure', allowedHz: HIGH_RES_RATES_HZ },
    bitDepth: { severity: 'failure', allowedBits: [24, 32] },
    // About 5 dB of peak headroom (REFERENCES, mastering-room fact, common practice).
    samplePeak: { severity: 'warning', ceilingDbfs: -5 },
    truePeak: { severity: 'warning', ceilingDbtp: -5 },
    // Never clips (REFERENCES, common practice): a single full-scale sample fails.
    clipping: { severity: 'failure', minRunSamples: 1 },
    dcOffset: { severity: 'warning', maxPercent: 0.1 },
    invertedChannels: { severity: 'warning' },
  },
};

/** Every built-in profile, in the order the product lists them. Validated at load. */
export const BUILT_IN_PROFILES: readonly DeliveryProfile[] = [
  STREAMING_HIRES,
  STREAMING_STANDARD,
  CD_MASTER,
  VINYL_12_33,
  VINYL_12_45,
  VINYL_7_45,
  BROADCAST_R128,
  PRE_LIMITER,
].map((profile) => deliveryProfileSchema.parse(profile));

/** The built-in profile with this id, or undefined. */
export function findBuiltInProfile(id: string): DeliveryProfile | undefined {
  return BUILT_IN_PROFILES.find((profile) => profile.id === id);
}

/** A copy of a profile to start a custom one: new id and name, version 1. */
export function copyProfile(profile: DeliveryProfile, id: string, name: string): DeliveryProfile {
  return deliveryProfileSchema.parse({ ...structuredClone(profile), id, name, version: 1 });
}
