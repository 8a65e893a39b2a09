import type { AudioMeasurements } from '../audio/types';
import {
  describeRange,
  type FindingInput,
  formatClock,
  formatFigure,
  formatFigureAgainst,
  formatKilohertz,
  formatSeconds,
  isAbove,
  isBelow,
  joinOr,
  verdict,
} from './finding';
import { AUDIO_RULE_IDS, RULE_TITLES } from './rule-titles';
import type { DeliveryRules } from './schema';
import type { TrackForCheck } from './types';

export interface TrackAudioContext {
  track: TrackForCheck;
  /** The declared gap before this track is 0 and a track precedes it on the same disc/side. */
  startsGaplessJoin: boolean;
  /** The next track on the same disc/side follows with a declared gap of 0. */
  endsGaplessJoin: boolean;
}

type Emit = (input: Omit<FindingInput, 'trackId'>) => void;

/** Findings for every configured audio rule on one track; a missing analysis is reported per rule. */
export function checkTrackAudio(
  rules: DeliveryRules,
  context: TrackAudioContext,
  measurements: AudioMeasurements | null,
): FindingInput[] {
  const out: FindingInput[] = [];
  const trackId = context.track.id;
  const emit: Emit = (input) => out.push({ ...input, trackId });

  if (measurements === null) {
    for (const ruleId of AUDIO_RULE_IDS) {
      const rule = rules[ruleId];
      if (!rule) continue;
      emit({
        ruleId,
        severity: rule.severity,
        measured: null,
        limit: null,
        unit: '',
        message: `No audio has been analysed for this track yet, so the ${RULE_TITLES[ruleId]} check cannot run.`,
      });
    }
    return out;
  }

  const m = measurements;
  checkFormat(rules, m, emit);
  checkLevels(rules, m, emit);
  checkLoudness(rules, m, emit);
  checkChannels(rules, m, emit);
  checkEdges(rules, m, context, emit);
  checkLength(rules, m, emit);
  return out;
}

function checkFormat(rules: DeliveryRules, m: AudioMeasurements, emit: Emit): void {
  const f = m.format;
  if (rules.container) {
    const rule = rules.container;
    const allowed = rule.allowed.map((c) => c.toLowerCase());
    const containerOk = allowed.includes(f.container.toLowerCase());
    const encodingOk = !rule.encodings || rule.encodings.includes(f.encoding);
    const wanted = joinOr(allowed.map((c) => c.toUpperCase()));
    emit({
      ruleId: 'container',
      severity: verdict(!containerOk || !encodingOk, rule.severity),
      measured: containerOk ? `${f.container} (${f.encoding})` : f.container,
      limit: rule.encodings
        ? `${allowed.join(', ')} (${rule.encodings.join(', ')})`
        : allowed.join(', '),
      unit: '',
      message: !containerOk
        ? `The file is ${f.container.toUpperCase()}; this profile takes ${wanted}.`
        : !encodingOk
          ? `The file holds ${describeEncoding(f.encoding)} samples; this profile takes ${joinOr(rule.encodings!.map(describeEncoding))} only.`
          : `The file is ${f.container.toUpperCase()} with ${describeEncoding(f.encoding)} samples, as the profile asks.`,
    });
  }
  if (rules.sampleRate) {
    const rule = rules.sampleRate;
    const ok = rule.allowedHz.includes(f.sampleRateHz);
    emit({
      ruleId: 'sampleRate',
      severity: verdict(!ok, rule.severity),
      measured: f.sampleRateHz,
      limit: rule.allowedHz.join(', '),
      unit: 'Hz',
      message: ok
        ? `The sample rate is ${formatKilohertz(f.sampleRateHz)}, as the profile asks.`
        : `The file is ${formatKilohertz(f.sampleRateHz)}; this profile takes ${joinOr(rule.allowedHz.map(formatKilohertz))}.`,
    });
  }
  if (rules.bitDepth) {
    const rule = rules.bitDepth;
    const ok = rule.allowedBits.includes(f.bitsPerSample);
    const described = `${f.bitsPerSample}-bit${f.encoding === 'pcm-float' ? ' float' : ''}`;
    emit({
      ruleId: 'bitDepth',
      severity: verdict(!ok, rule.severity),
      measured: f.bitsPerSample,
      limit: rule.allowedBits.join(', '),
      unit: 'bit',
      message: ok
        ? `The file is ${described}, as the profile asks.`
        : `The file is ${described}; this profile takes ${joinOr(rule.allowedBits.map((b) => `${b}-bit`))}.`,
    });
  }
  if (rules.effectiveBitDepth && m.channels.length > 0) {
    const rule = rules.effectiveBitDepth;
    const effective = Math.min(...m.channels.map((c) => c.effectiveBitDepth));
    const broken = effective < rule.minBits;
    emit({
      ruleId: 'effectiveBitDepth',
      severity: verdict(broken, rule.severity),
      measured: effective,
      limit: rule.minBits,
      unit: 'bit',
      message: broken
        ? `Only ${effective} of the ${f.bitsPerSample} stored bits ever change: this looks like ${effective}-bit audio padded out, and the profile asks for at least ${rule.minBits} bits that carry audio.`
        : `The audio uses ${effective} bits, at least the ${rule.minBits} the profile asks for.`,
    });
  }
  if (rules.channelCount) {
    const rule = rules.channelCount;
    const ok = rule.allowed.includes(f.channels);
    emit({
      ruleId: 'channelCount',
      severity: verdict(!ok, rule.severity),
      measured: f.channels,
      limit: rule.allowed.join(', '),
      unit: 'channels',
      message: ok
        ? `The file has ${describeChannels(f.channels)}, as the profile asks.`
        : `The file has ${describeChannels(f.channels)}; this profile takes ${joinOr(rule.allowed.map(describeChannels))}.`,
    });
  }
}

function checkLevels(rules: DeliveryRules, m: AudioMeasurements, emit: Emit): void {
  if (rules.samplePeak) {
    const rule = rules.samplePeak;
    const peak = m.loudness.samplePeakDbfs;
    const broken = peak !== null && isAbove(peak, rule.ceilingDbfs);
    emit({
      ruleId: 'samplePeak',
      severity: verdict(broken, rule.severity),
      measured: peak,
      limit: rule.ceilingDbfs,
      unit: 'dBFS',
      message:
        peak === null
          ? 'The file is digital silence, so it has no sample peak.'
          : broken
            ? `Sample peak reaches ${formatFigureAgainst(peak, rule.ceilingDbfs)} dBFS, above the ${formatFigure(rule.ceilingDbfs)} dBFS ceiling.`
            : `Sample peak is ${formatFigure(peak)} dBFS, within the ${formatFigure(rule.ceilingDbfs)} dBFS ceiling.`,
    });
  }
  if (rules.truePeak) {
    const rule = rules.truePeak;
    const peak = m.loudness.truePeakDbtp;
    const at = m.loudness.truePeakAtSeconds;
    const broken = peak !== null && isAbove(peak, rule.ceilingDbtp);
    emit({
      ruleId: 'truePeak',
      severity: verdict(broken, rule.severity),
      measured: peak,
      limit: rule.ceilingDbtp,
      unit: 'dBTP',
      atSeconds: peak === null ? null : at,
      message:
        peak === null
          ? 'The file is digital silence, so it has no true peak.'
          : broken
            ? `True peak reaches ${formatFigureAgainst(peak, rule.ceilingDbtp)} dBTP${at === null ? '' : ` at ${formatClock(at)}`}, above the ${formatFigure(rule.ceilingDbtp)} dBTP ceiling.`
            : `True peak is ${formatFigure(peak)} dBTP, within the ${formatFigure(rule.ceilingDbtp)} dBTP ceiling.`,
    });
  }
  if (rules.dcOffset) {
    const rule = rules.dcOffset;
    m.channels.forEach((channel, index) => {
      const percent = Math.abs(channel.dcOffset) * 100;
      const broken = isAbove(percent, rule.maxPercent);
      emit({
        ruleId: 'dcOffset',
        channel: index + 1,
        severity: verdict(broken, rule.severity),
        measured: percent,
        limit: rule.maxPercent,
        unit: '%',
        message: broken
          ? `Channel ${index + 1} sits ${formatPercent(percent)} of full scale off centre (DC offset), above the ${formatPercent(rule.maxPercent)} limit.`
          : `Channel ${index + 1} has a DC offset of ${formatPercent(percent)}, within the ${formatPercent(rule.maxPercent)} limit.`,
      });
    });
  }
  if (rules.clipping) {
    const rule = rules.clipping;
    m.channels.forEach((channel, index) => {
      const c = channel.clipping;
      const qualifying = c.runs.filter((run) => run.lengthSamples >= rule.minRunSamples);
      const broken = c.runCount > 0 && c.longestRunSamples >= rule.minRunSamples;
      const listComplete = c.runs.length >= c.runCount;
      const countText = listComplete ? `${qualifying.length}` : `at least ${qualifying.length}`;
      const first = qualifying[0];
      const blindSpot =
        rule.minRunSamples < c.minRunSamples
          ? ` (the analysis counted runs of ${c.minRunSamples} or more samples)`
          : '';
      emit({
        ruleId: 'clipping',
        channel: index + 1,
        severity: verdict(broken, rule.severity),
        measured: c.runCount > 0 ? c.longestRunSamples : 0,
        limit: rule.minRunSamples,
        unit: 'samples',
        atSeconds: broken && first ? first.atSeconds : null,
        message: broken
          ? `Channel ${index + 1} clips: ${countText} run${qualifying.length === 1 && listComplete ? '' : 's'} of ${rule.minRunSamples} or more full-scale samples, the longest ${c.longestRunSamples} samples${first ? `, the first at ${formatClock(first.atSeconds)}` : ''}.`
          : `Channel ${index + 1} has no run of ${rule.minRunSamples} or more full-scale samples${blindSpot}.`,
      });
    });
  }
}

function checkLoudness(rules: DeliveryRules, m: AudioMeasurements, emit: Emit): void {
  const l = m.loudness;
  if (rules.integratedLoudness) {
    const rule = rules.integratedLoudness;
    const hasTarget = rule.targetLufs !== undefined && rule.toleranceLu !== undefined;
    const lower = maxDefined(
      rule.minLufs,
      hasTarget ? rule.targetLufs! - rule.toleranceLu! : undefined,
    );
    const upper = minDefined(
      rule.maxLufs,
      hasTarget ? rule.targetLufs! + rule.toleranceLu! : undefined,
    );
    const wanted = hasTarget
      ? `the ${formatFigure(rule.targetLufs!)} LUFS target ± ${formatFigure(rule.toleranceLu!)} LU`
      : describeRange(lower, upper, 'LUFS');
    const value = l.integratedLufs;
    const tooLow = value === null || (lower !== undefined && isBelow(value, lower));
    const tooHigh = value !== null && upper !== undefined && isAbove(value, upper);
    const nearest =
      value === null
        ? (lower ?? upper ?? null)
        : tooHigh || lower === undefined
          ? (upper ?? null)
          : tooLow || upper === undefined
            ? lower
            : value - lower <= upper - value
              ? lower
              : upper;
    emit({
      ruleId: 'integratedLoudness',
      severity: verdict(value === null ? lower !== undefined : tooLow || tooHigh, rule.severity),
      measured: value,
      limit: nearest,
      unit: 'LUFS',
      message:
        value === null
          ? `The track is too quiet to measure its integrated loudness (every block is below the −70 LUFS gate); the profile asks for ${wanted}.`
          : tooHigh
            ? `Integrated loudness is ${formatFigure(value)} LUFS, louder than ${wanted} (at most ${formatFigure(upper!)} LUFS).`
            : tooLow
              ? `Integrated loudness is ${formatFigure(value)} LUFS, quieter than ${wanted} (at least ${formatFigure(lower!)} LUFS).`
              : `Integrated loudness is ${formatFigure(value)} LUFS, within ${wanted}.`,
    });
  }
  if (rules.loudnessRange) {
    const rule = rules.loudnessRange;
    const value = l.rangeLu;
    const tooLow = value !== null && rule.minLu !== undefined && isBelow(value, rule.minLu);
    const tooHigh = value !== null && rule.maxLu !== undefined && isAbove(value, rule.maxLu);
    const wanted = describeRange(rule.minLu, rule.maxLu, 'LU');
    emit({
      ruleId: 'loudnessRange',
      severity: verdict(tooLow || tooHigh, rule.severity),
      measured: value,
      limit: tooLow ? rule.minLu! : tooHigh ? rule.maxLu! : (rule.maxLu ?? rule.minLu ?? null),
      unit: 'LU',
      message:
        value === null
          ? 'The track is too short or too quiet for a loudness range to be measured.'
          : tooLow || tooHigh
            ? `Loudness range is ${formatFigure(value)} LU; the profile asks for ${wanted}.`
            : `Loudness range is ${formatFigure(value)} LU, within ${wanted}.`,
    });
  }
  if (rules.shortTermLoudness) {
    const rule = rules.shortTermLoudness;
    const value = l.maxShortTermLufs;
    const broken = value !== null && isAbove(value, rule.maxLufs);
    const at = broken ? locateLoudest(m) : null;
    emit({
      ruleId: 'shortTermLoudness',
      severity: verdict(broken, rule.severity),
      measured: value,
      limit: rule.maxLufs,
      unit: 'LUFS',
      atSeconds: at,
      message:
        value === null
          ? 'The track is too quiet for its short-term loudness to be measured.'
          : broken
            ? `Short-term loudness reaches ${formatFigureAgainst(value, rule.maxLufs)} LUFS${at === null ? '' : ` around ${formatClock(at)}`}, above the ${formatFigure(rule.maxLufs)} LUFS maximum.`
            : `Short-term loudness peaks at ${formatFigure(value)} LUFS, within the ${formatFigure(rule.maxLufs)} LUFS maximum.`,
    });
  }
}

function checkChannels(rules: DeliveryRules, m: AudioMeasurements, emit: Emit): void {
  const stereo = m.format.channels >= 2;
  const corr = m.correlation;
  if (rules.identicalChannels) {
    const broken = stereo && corr.identicalChannels;
    emit({
      ruleId: 'identicalChannels',
      severity: verdict(broken, rules.identicalChannels.severity),
      measured: stereo ? (corr.identicalChannels ? 'identical' : 'different') : 'mono',
      limit: 'different',
      unit: '',
      message: !stereo
        ? 'The file is mono, so there are no channels to compare.'
        : broken
          ? 'Both channels are identical sample for sample: this is mono audio in a stereo file.'
          : 'The two channels differ, as a stereo master should.',
    });
  }
  if (rules.invertedChannels) {
    const broken = stereo && corr.invertedChannels;
    emit({
      ruleId: 'invertedChannels',
      severity: verdict(broken, rules.invertedChannels.severity),
      measured: stereo ? (corr.invertedChannels ? 'inverted' : 'not inverted') : 'mono',
      limit: 'not inverted',
      unit: '',
      message: !stereo
        ? 'The file is mono, so there are no channels to compare.'
        : broken
          ? 'Channel 2 is channel 1 with its polarity inverted: the track cancels to silence when played in mono.'
          : 'Neither channel is a polarity-inverted copy of the other.',
    });
  }
  if (rules.lowFrequencyCorrelation) {
    const rule = rules.lowFrequencyCorrelation;
    const value = stereo ? corr.lowBand : null;
    const belowFloor = value !== null && isBelow(value, rule.minCorrelation);
    const belowWarning =
      value !== null &&
      !belowFloor &&
      rule.warnBelow !== undefined &&
      isBelow(value, rule.warnBelow);
    const band = `below ${Math.round(corr.lowBandHz)} Hz`;
    emit({
      ruleId: 'lowFrequencyCorrelation',
      severity: belowFloor ? rule.severity : belowWarning ? 'warning' : 'pass',
      measured: value,
      limit: belowFloor ? rule.minCorrelation : (rule.warnBelow ?? rule.minCorrelation),
      unit: '',
      message:
        value === null
          ? 'The file is mono (or silent), so its low frequencies are in phase by definition.'
          : belowFloor
            ? `The channels correlate at ${formatFigure(value, 2)} ${band}, under the ${formatFigure(rule.minCorrelation, 2)} floor: out-of-phase bass cuts as vertical groove motion and can make the stylus jump.`
            : belowWarning
              ? `The channels correlate at only ${formatFigure(value, 2)} ${band} (under ${formatFigure(rule.warnBelow!, 2)}): keep the bass close to mono for cutting.`
              : `The channels correlate at ${formatFigure(value, 2)} ${band}, above the ${formatFigure(rule.warnBelow ?? rule.minCorrelation, 2)} floor.`,
    });
  }
}

function checkEdges(
  rules: DeliveryRules,
  m: AudioMeasurements,
  context: TrackAudioContext,
  emit: Emit,
): void {
  for (const [ruleId, edge] of [
    ['headSilence', 'start'],
    ['tailSilence', 'end'],
  ] as const) {
    const rule = rules[ruleId];
    if (!rule) continue;
    const value = edge === 'start' ? m.silence.headSeconds : m.silence.tailSeconds;
    const tooShort = rule.minSeconds !== undefined && isBelow(value, rule.minSeconds);
    const tooLong = rule.maxSeconds !== undefined && isAbove(value, rule.maxSeconds);
    emit({
      ruleId,
      severity: verdict(tooShort || tooLong, rule.severity),
      measured: value,
      limit: tooShort ? rule.minSeconds! : (rule.maxSeconds ?? rule.minSeconds!),
      unit: 's',
      atSeconds: edge === 'start' ? 0 : Math.max(0, m.format.durationSeconds - value),
      message: `The file has ${formatSeconds(value)} of silence at the ${edge} (below ${formatFigure(m.silence.thresholdDbfs)} dBFS); ${
        tooShort || tooLong ? 'the profile asks for' : 'the profile allows'
      } ${describeRange(rule.minSeconds, rule.maxSeconds, 's')}.`,
    });
  }

  for (const [ruleId, edge] of [
    ['abruptStart', 'start'],
    ['abruptEnd', 'end'],
  ] as const) {
    const rule = rules[ruleId];
    if (!rule) continue;
    const isJoin = edge === 'start' ? context.startsGaplessJoin : context.endsGaplessJoin;
    const atSeconds = edge === 'start' ? 0 : m.format.durationSeconds;
    m.channels.forEach((channel, index) => {
      const level = edge === 'start' ? channel.firstSampleDbfs : channel.lastSampleDbfs;
      const broken = !isJoin && level !== null && isAbove(level, rule.maxLevelDbfs);
      const levelText = level === null ? 'exactly zero' : `${formatFigure(level)} dBFS`;
      emit({
        ruleId,
        channel: index + 1,
        severity: verdict(broken, rule.severity),
        measured: level,
        limit: rule.maxLevelDbfs,
        unit: 'dBFS',
        atSeconds,
        message: isJoin
          ? `Channel ${index + 1} ${edge === 'start' ? 'starts' : 'ends'} at a gapless join, which the join check judges instead.`
          : broken
            ? `Channel ${index + 1} ${edge === 'start' ? 'starts' : 'ends'} abruptly at ${levelText}, above ${formatFigure(rule.maxLevelDbfs)} dBFS: expect a click ${edge === 'start' ? 'when playback starts' : 'when playback stops'}; add a short fade.`
            : `Channel ${index + 1} ${edge === 'start' ? 'starts' : 'ends'} at ${levelText}, at or below ${formatFigure(rule.maxLevelDbfs)} dBFS.`,
      });
    });
  }
}

function checkLength(rules: DeliveryRules, m: AudioMeasurements, emit: Emit): void {
  const duration = m.format.durationSeconds;
  if (rules.trackDuration) {
    const rule = rules.trackDuration;
    const tooShort = rule.minSeconds !== undefined && isBelow(duration, rule.minSeconds);
    const tooLong = rule.maxSeconds !== undefined && isAbove(duration, rule.maxSeconds);
    emit({
      ruleId: 'trackDuration',
      severity: verdict(tooShort || tooLong, rule.severity),
      measured: duration,
      limit: tooShort ? rule.minSeconds! : (rule.maxSeconds ?? rule.minSeconds!),
      unit: 's',
      message: `The track runs ${formatClock(duration)} (${formatSeconds(duration)}); ${
        tooShort || tooLong ? 'the profile asks for' : 'the profile allows'
      } ${describeRange(rule.minSeconds, rule.maxSeconds, 's')}.`,
    });
  }
  if (rules.lengthWholeCdFrames) {
    const rule = rules.lengthWholeCdFrames;
    const { frames, remainderSamples } = m.cdFrames;
    const broken = remainderSamples !== 0;
    emit({
      ruleId: 'lengthWholeCdFrames',
      severity: verdict(broken, rule.severity),
      measured: remainderSamples,
      limit: 0,
      unit: 'samples',
      atSeconds: broken ? duration : null,
      message: broken
        ? `The track is ${frames} CD frames and ${remainderSamples} samples long; a disc track is a whole number of frames (588 samples at 44.1 kHz), so the plant will pad or cut the last ${remainderSamples} samples.`
        : `The track is exactly ${frames} CD frames long.`,
    });
  }
}

function locateLoudest(m: AudioMeasurements): number | null {
  const { shortTermLufs, stepSeconds } = m.series.loudness;
  let best: number | null = null;
  let bestIndex = -1;
  shortTermLufs.forEach((value, index) => {
    if (value !== null && (best === null || value > best)) {
      best = value;
      bestIndex = index;
    }
  });
  return bestIndex < 0 ? null : bestIndex * stepSeconds;
}

function describeEncoding(encoding: string): string {
  return encoding === 'pcm-float' ? 'floating-point PCM' : 'integer PCM';
}

function describeChannels(count: number): string {
  if (count === 1) return 'one channel (mono)';
  if (count === 2) return 'two channels (stereo)';
  return `${count} channels`;
}

function formatPercent(value: number): string {
  return `${Number(value.toPrecision(2))} %`;
}

function maxDefined(a: number | undefined, b: number | undefined): number | undefined {
  if (a === undefined) return b;
  if (b === undefined) return a;
  return Math.max(a, b);
}

function minDefined(a: number | undefined, b: number | undefined): number | undefined {
  if (a === undefined) return b;
  if (b === undefined) return a;
  return Math.min(a, b);
}
