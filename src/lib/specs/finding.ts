import type { RuleId, RuleSeverity } from './schema';
import type { Finding, FindingSeverity } from './types';

// Measurements arrive as floats (−23.3 + 23 is not exactly −0.3); a margin far below any
// displayed precision keeps a value that sits on a limit on the passing side.
const MARGIN = 1e-9;

/** True when value is above limit by more than rounding noise. */
export function isAbove(value: number, limit: number): boolean {
  return value > limit + MARGIN;
}

/** True when value is below limit by more than rounding noise. */
export function isBelow(value: number, limit: number): boolean {
  return value < limit - MARGIN;
}

/** Stable finding key: profile, rule, subject (track id, "release", "disc-2", "side-B"), channel. */
export function buildFindingKey(
  profileId: string,
  ruleId: RuleId,
  subject: string,
  channel: number | null = null,
): string {
  return `${profileId}:${ruleId}:${subject}:${channel === null ? 'all' : `ch${channel}`}`;
}

export interface FindingInput {
  ruleId: RuleId;
  severity: FindingSeverity;
  trackId: string | null;
  /** Overrides the key subject for release-level findings about one disc or side. */
  subject?: string;
  channel?: number | null;
  measured: number | string | null;
  limit: number | string | null;
  unit: string;
  message: string;
  atSeconds?: number | null;
}

/** Builds findings for one profile with stable keys. */
export function createFindingFactory(profileId: string): (input: FindingInput) => Finding {
  return (input) => {
    const channel = input.channel ?? null;
    const finding: Finding = {
      key: buildFindingKey(
        profileId,
        input.ruleId,
        input.subject ?? input.trackId ?? 'release',
        channel,
      ),
      ruleId: input.ruleId,
      profileId,
      severity: input.severity,
      trackId: input.trackId,
      channel,
      measured: input.measured,
      limit: input.limit,
      unit: input.unit,
      message: input.message,
    };
    if (input.atSeconds !== undefined && input.atSeconds !== null)
      finding.atSeconds = input.atSeconds;
    return finding;
  };
}

/** The finding severity for a rule that is broken (its own) or kept ('pass'). */
export function verdict(broken: boolean, severity: RuleSeverity): FindingSeverity {
  return broken ? severity : 'pass';
}

/** A level or figure with one decimal and a true minus sign ("−1.0"). */
export function formatFigure(value: number, decimals = 1): string {
  const text = Math.abs(value).toFixed(decimals);
  return value < 0 && Number(text) !== 0 ? `−${text}` : text;
}

/**
 * A measured figure shown beside its limit: one decimal, or more when one decimal would make
 * a value that breaks the limit look equal to it ("−0.96 above −1.0", not "−1.0 above −1.0").
 */
export function formatFigureAgainst(value: number, limit: number, decimals = 1): string {
  let places = decimals;
  while (
    places < 3 &&
    value !== limit &&
    formatFigure(value, places) === formatFigure(limit, places)
  ) {
    places += 1;
  }
  return formatFigure(value, places);
}

/** Seconds as m:ss.s, or h:mm:ss for an hour or more ("1:23.4", "21:05", "1:02:03"). */
export function formatClock(totalSeconds: number, withTenths = true): string {
  const rounded = withTenths ? Math.round(totalSeconds * 10) / 10 : Math.round(totalSeconds);
  const hours = Math.floor(rounded / 3600);
  const minutes = Math.floor((rounded % 3600) / 60);
  const seconds = rounded % 60;
  const secondsText = withTenths
    ? seconds.toFixed(1).padStart(4, '0')
    : String(seconds).padStart(2, '0');
  return hours > 0
    ? `${hours}:${String(minutes).padStart(2, '0')}:${secondsText}`
    : `${minutes}:${secondsText}`;
}

/** Seconds with up to three decimals, trailing zeros dropped ("2 s", "2.013 s"). */
export function formatSeconds(value: number): string {
  return `${Number(value.toFixed(3))} s`;
}

/** Sample rate in kHz ("44.1 kHz"). */
export function formatKilohertz(hz: number): string {
  return `${Number((hz / 1000).toFixed(3))} kHz`;
}

/** "a", "a or b", "a, b or c". */
export function joinOr(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]}`;
}

/** "a", "a and b", "a, b and c". */
export function joinAnd(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** "between 2 and 4 s", "at least 4 s", "at most 10 s". */
export function describeRange(
  min: number | undefined,
  max: number | undefined,
  unit: string,
): string {
  const show = (v: number) => (unit === 's' ? formatSeconds(v) : `${formatFigure(v)} ${unit}`);
  if (min !== undefined && max !== undefined) {
    return min === max
      ? `exactly ${show(min)}`
      : `between ${show(min).replace(/ s$/, '')} and ${show(max)}`;
  }
  if (min !== undefined) return `at least ${show(min)}`;
  if (max !== undefined) return `at most ${show(max)}`;
  return 'any value';
}

/** "track 3", or "track A2" on a vinyl side. */
export function describeTrack(track: { position: number; side: string | null }): string {
  return track.side ? `track ${track.side}${track.position}` : `track ${track.position}`;
}
