import type { AudioMeasurements } from '../audio/types';
import {
  describeRange,
  describeTrack,
  type FindingInput,
  formatClock,
  formatFigure,
  formatSeconds,
  isAbove,
  isBelow,
  verdict,
} from './finding';
import type { DeliveryRules } from './schema';
import type { MeasurementsByTrack, TrackForCheck } from './types';
import { describeVinylGuidance, estimateVinylLevelDb, type VINYL_FORMATS } from './vinyl';

/** CD frames (sectors) per second: IEC 60908 / Red Book, 75 sectors of 588 sample frames. */
export const CD_FRAMES_PER_SECOND = 75;

// Gaps are typed in seconds; a gap within a microsecond of a whole frame is treated as whole.
const FRAME_TOLERANCE = 1e-6;

/** Tracks in playing order: disc, then side, then position. */
export function sortTracks(tracks: readonly TrackForCheck[]): TrackForCheck[] {
  return [...tracks].sort(
    (a, b) =>
      a.disc - b.disc || (a.side ?? '').localeCompare(b.side ?? '') || a.position - b.position,
  );
}

/** The track that plays just before each track on the same disc and side, by track id. */
export function findPreviousTracks(
  sorted: readonly TrackForCheck[],
): Map<string, TrackForCheck | null> {
  const previous = new Map<string, TrackForCheck | null>();
  sorted.forEach((track, i) => {
    const before = sorted[i - 1];
    previous.set(
      track.id,
      before && before.disc === track.disc && before.side === track.side ? before : null,
    );
  });
  return previous;
}

/** True when a declared gap counts as none at all (a gapless join). */
export function isGapless(gapSeconds: number): boolean {
  return Math.abs(gapSeconds) < FRAME_TOLERANCE;
}

/** A gap rounded to the nearest whole CD frame, in seconds. */
export function snapSecondsToCdFrames(seconds: number): number {
  return Math.round(seconds * CD_FRAMES_PER_SECOND) / CD_FRAMES_PER_SECOND;
}

/** Release-level rules about layout: track count and running time. */
export function checkLayout(
  rules: DeliveryRules,
  sorted: readonly TrackForCheck[],
  measurements: MeasurementsByTrack,
): FindingInput[] {
  const out: FindingInput[] = [];
  if (rules.trackCount) {
    const rule = rules.trackCount;
    for (const [disc, tracks] of groupBy(sorted, (t) => String(t.disc))) {
      const broken = tracks.length > rule.max;
      out.push({
        ruleId: 'trackCount',
        trackId: null,
        subject: `disc-${disc}`,
        severity: verdict(broken, rule.severity),
        measured: tracks.length,
        limit: rule.max,
        unit: 'tracks',
        message: broken
          ? `Disc ${disc} has ${tracks.length} tracks; the profile allows at most ${rule.max}.`
          : `Disc ${disc} has ${tracks.length} track${tracks.length === 1 ? '' : 's'}, within the limit of ${rule.max}.`,
      });
    }
  }
  if (rules.runningTime) {
    const rule = rules.runningTime;
    const keyOf = (t: TrackForCheck) =>
      rule.scope === 'release'
        ? 'release'
        : rule.scope === 'disc'
          ? `disc-${t.disc}`
          : `side-${t.disc}-${t.side ?? '?'}`;
    for (const [subject, tracks] of groupBy(sorted, keyOf)) {
      const first = tracks[0]!;
      const name =
        rule.scope === 'release'
          ? 'The release'
          : rule.scope === 'disc'
            ? `Disc ${first.disc}`
            : first.side
              ? `Side ${first.side}${hasSeveralDiscs(sorted) ? ` of disc ${first.disc}` : ''}`
              : 'Tracks without a side';
      const missing = tracks.filter((t) => !measurements[t.id]);
      const base = {
        ruleId: 'runningTime' as const,
        trackId: null,
        subject: subject === 'release' ? undefined : subject,
        unit: 's',
      };
      if (missing.length > 0) {
        out.push({
          ...base,
          severity: rule.severity,
          measured: null,
          limit: rule.maxSeconds,
          message: `${name} cannot be timed until every track has analysed audio (${missing.length} missing).`,
        });
        continue;
      }
      const total = tracks.reduce(
        (sum, t) =>
          sum +
          t.gapBeforeSeconds +
          (measurements[t.id] as AudioMeasurements).format.durationSeconds,
        0,
      );
      const overMax = isAbove(total, rule.maxSeconds);
      const overWarning =
        !overMax && rule.warnAboveSeconds !== undefined && isAbove(total, rule.warnAboveSeconds);
      const guidance = rule.vinylFormat ? vinylAdvice(rule.vinylFormat, total) : '';
      out.push({
        ...base,
        severity: overMax ? rule.severity : overWarning ? 'warning' : 'pass',
        measured: total,
        limit: overMax ? rule.maxSeconds : (rule.warnAboveSeconds ?? rule.maxSeconds),
        message: overMax
          ? `${name} runs ${formatClock(total, false)} with gaps, over the ${formatClock(rule.maxSeconds, false)} maximum${guidance}.`
          : overWarning
            ? `${name} runs ${formatClock(total, false)} with gaps, over ${formatClock(rule.warnAboveSeconds!, false)}${guidance}.`
            : `${name} runs ${formatClock(total, false)} with gaps, within ${formatClock(rule.warnAboveSeconds ?? rule.maxSeconds, false)}${guidance}.`,
      });
    }
  }
  return out;
}

function vinylAdvice(format: keyof typeof VINYL_FORMATS, totalSeconds: number): string {
  const level = estimateVinylLevelDb(format, totalSeconds);
  const expectation =
    level === null
      ? 'this is beyond the chart, so expect a much quieter cut or split it over more sides'
      : level >= 0
        ? 'so it can be cut at full level'
        : `so expect it to be cut about ${formatFigure(-level)} dB quieter`;
  return `; ${describeVinylGuidance(format)}, ${expectation}`;
}

function hasSeveralDiscs(sorted: readonly TrackForCheck[]): boolean {
  return new Set(sorted.map((t) => t.disc)).size > 1;
}

/** Per-track rules about declared gaps and about what the audio does at each join. */
export function checkGaps(
  rules: DeliveryRules,
  sorted: readonly TrackForCheck[],
  measurements: MeasurementsByTrack,
): FindingInput[] {
  const out: FindingInput[] = [];
  const previousById = findPreviousTracks(sorted);
  const firstOfDisc = new Set<string>();
  for (const [, tracks] of groupBy(sorted, (t) => String(t.disc))) firstOfDisc.add(tracks[0]!.id);

  for (const track of sorted) {
    const gap = track.gapBeforeSeconds;
    const previous = previousById.get(track.id) ?? null;
    const rangeRule = firstOfDisc.has(track.id)
      ? rules.firstTrackPreGap
      : previous
        ? rules.gapBetweenTracks
        : undefined;
    const rangeRuleId = firstOfDisc.has(track.id) ? 'firstTrackPreGap' : 'gapBetweenTracks';
    if (rangeRule) {
      const tooShort = rangeRule.minSeconds !== undefined && isBelow(gap, rangeRule.minSeconds);
      const tooLong = rangeRule.maxSeconds !== undefined && isAbove(gap, rangeRule.maxSeconds);
      const what =
        rangeRuleId === 'firstTrackPreGap'
          ? 'The pre-gap before the first track'
          : `The gap before ${describeTrack(track)}`;
      out.push({
        ruleId: rangeRuleId,
        trackId: track.id,
        severity: verdict(tooShort || tooLong, rangeRule.severity),
        measured: gap,
        limit: tooShort ? rangeRule.minSeconds! : (rangeRule.maxSeconds ?? rangeRule.minSeconds!),
        unit: 's',
        message: `${what} is ${formatSeconds(gap)}; ${tooShort || tooLong ? 'the profile asks for' : 'the profile allows'} ${describeRange(rangeRule.minSeconds, rangeRule.maxSeconds, 's')}.`,
      });
    }
    if (rules.gapWholeCdFrames) {
      const frames = gap * CD_FRAMES_PER_SECOND;
      const whole = Math.abs(frames - Math.round(frames)) < FRAME_TOLERANCE * CD_FRAMES_PER_SECOND;
      const below = Math.floor(frames) / CD_FRAMES_PER_SECOND;
      const above = Math.ceil(frames) / CD_FRAMES_PER_SECOND;
      out.push({
        ruleId: 'gapWholeCdFrames',
        trackId: track.id,
        severity: verdict(!whole, rules.gapWholeCdFrames.severity),
        measured: Number(frames.toFixed(6)),
        limit: whole ? Math.round(frames) : 'whole frames',
        unit: 'CD frames',
        message: whole
          ? `The ${formatSeconds(gap)} gap before ${describeTrack(track)} is ${Math.round(frames)} whole CD frames.`
          : `The ${formatSeconds(gap)} gap before ${describeTrack(track)} is ${Number(frames.toFixed(3))} CD frames; a disc gap is whole frames of 1/75 s, so use ${formatSeconds(below)} or ${formatSeconds(above)}.`,
      });
    }
    if (previous) out.push(...checkJoin(rules, previous, track, measurements));
  }
  return out;
}

function checkJoin(
  rules: DeliveryRules,
  previous: TrackForCheck,
  track: TrackForCheck,
  measurements: MeasurementsByTrack,
): FindingInput[] {
  const out: FindingInput[] = [];
  const gapless = isGapless(track.gapBeforeSeconds);
  const rule = gapless ? rules.gaplessJoin : rules.gapDoubledBySilence;
  if (!rule) return out;
  const ruleId = gapless ? 'gaplessJoin' : 'gapDoubledBySilence';
  const before = measurements[previous.id];
  const after = measurements[track.id];
  if (!before || !after) {
    out.push({
      ruleId,
      trackId: track.id,
      severity: rule.severity,
      measured: null,
      limit: null,
      unit: '',
      message: `The join from ${describeTrack(previous)} into ${describeTrack(track)} cannot be checked until both files are analysed.`,
    });
    return out;
  }
  const tail = before.silence.tailSeconds;
  const head = after.silence.headSeconds;
  const silence = tail + head;
  const where = `(${formatSeconds(tail)} at the end of ${describeTrack(previous)}, ${formatSeconds(head)} at the start of ${describeTrack(track)})`;

  if (rules.gaplessJoin && gapless) {
    const joinRule = rules.gaplessJoin;
    const channelCount = Math.min(before.channels.length, after.channels.length);
    for (let c = 0; c < channelCount; c += 1) {
      const last = before.channels[c]!.lastSampleDbfs;
      const first = after.channels[c]!.firstSampleDbfs;
      // Only the sizes of the two samples are known, not their signs, so this step is the
      // smallest jump the join can have; opposite signs would make it larger.
      const step = Math.abs(toAmplitude(last) - toAmplitude(first));
      const stepDbfs = step > 0 ? 20 * Math.log10(step) : null;
      const broken = stepDbfs !== null && isAbove(stepDbfs, joinRule.maxStepDbfs);
      out.push({
        ruleId,
        trackId: track.id,
        channel: c + 1,
        severity: verdict(broken, joinRule.severity),
        measured: stepDbfs,
        limit: joinRule.maxStepDbfs,
        unit: 'dBFS',
        atSeconds: 0,
        message: broken
          ? `Channel ${c + 1} jumps from ${describeLevel(last)} at the end of ${describeTrack(previous)} to ${describeLevel(first)} at the start of ${describeTrack(track)}, a step of at least ${formatFigure(stepDbfs!)} dBFS: expect a click at the gapless join.`
          : `Channel ${c + 1} runs on from ${describeTrack(previous)} into ${describeTrack(track)} without a step above ${formatFigure(joinRule.maxStepDbfs)} dBFS.`,
      });
    }
    const faded = isAbove(silence, joinRule.maxSilenceSeconds);
    out.push({
      ruleId,
      trackId: track.id,
      severity: verdict(faded, joinRule.severity),
      measured: silence,
      limit: joinRule.maxSilenceSeconds,
      unit: 's',
      atSeconds: 0,
      message: faded
        ? `The gapless join into ${describeTrack(track)} holds ${formatSeconds(silence)} of silence inside the files ${where}: the music fades to silence where the album should run on.`
        : `The gapless join into ${describeTrack(track)} holds ${formatSeconds(silence)} of silence, within ${formatSeconds(joinRule.maxSilenceSeconds)}.`,
    });
  }

  if (rules.gapDoubledBySilence && !gapless) {
    const doubleRule = rules.gapDoubledBySilence;
    const broken = isAbove(silence, doubleRule.maxSilenceSeconds);
    out.push({
      ruleId,
      trackId: track.id,
      severity: verdict(broken, doubleRule.severity),
      measured: silence,
      limit: doubleRule.maxSilenceSeconds,
      unit: 's',
      atSeconds: 0,
      message: broken
        ? `Besides the declared ${formatSeconds(track.gapBeforeSeconds)} gap, the files hold ${formatSeconds(silence)} of silence at this join ${where}, so listeners hear ${formatSeconds(track.gapBeforeSeconds + silence)} of silence.`
        : `The files add ${formatSeconds(silence)} of silence to the declared ${formatSeconds(track.gapBeforeSeconds)} gap, within ${formatSeconds(doubleRule.maxSilenceSeconds)}.`,
    });
  }
  return out;
}

function toAmplitude(levelDbfs: number | null): number {
  return levelDbfs === null ? 0 : 10 ** (levelDbfs / 20);
}

function describeLevel(levelDbfs: number | null): string {
  return levelDbfs === null ? 'silence' : `${formatFigure(levelDbfs)} dBFS`;
}

function groupBy<T>(items: readonly T[], keyOf: (item: T) => string): Map<string, T[]> {
  const groups = new Map<string, T[]>();
  for (const item of items) {
    const key = keyOf(item);
    const group = groups.get(key);
    if (group) group.push(item);
    else groups.set(key, [item]);
  }
  return groups;
}
