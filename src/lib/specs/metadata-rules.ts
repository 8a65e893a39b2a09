import { formatIsrc, parseIsrc, parseUpcEan } from '../identifiers';
import { describeTrack, type FindingInput, joinAnd, joinOr, verdict } from './finding';
import type { DeliveryRules } from './schema';
import type { ReleaseForCheck, TrackForCheck } from './types';

/** Per-track ISRC and credit rules, then release-level barcode and artwork rules. */
export function checkMetadata(
  rules: DeliveryRules,
  release: ReleaseForCheck,
  sorted: readonly TrackForCheck[],
): FindingInput[] {
  const out: FindingInput[] = [];
  const storedIsrc = new Map<string, string | null>();
  for (const track of sorted) {
    const parsed = track.isrc && track.isrc.trim() !== '' ? parseIsrc(track.isrc) : null;
    storedIsrc.set(track.id, parsed?.ok ? parsed.value : null);
  }

  for (const track of sorted) {
    const raw = track.isrc?.trim() ? track.isrc.trim() : null;
    const isrc = storedIsrc.get(track.id) ?? null;
    if (rules.isrcPresent) {
      out.push({
        ruleId: 'isrcPresent',
        trackId: track.id,
        severity: verdict(raw === null, rules.isrcPresent.severity),
        measured: raw,
        limit: 'present',
        unit: '',
        message:
          raw === null
            ? `${capitalise(describeTrack(track))} has no ISRC; every recording delivered needs one.`
            : `${capitalise(describeTrack(track))} has an ISRC.`,
      });
    }
    if (rules.isrcValid && raw !== null) {
      const parsed = parseIsrc(raw);
      out.push({
        ruleId: 'isrcValid',
        trackId: track.id,
        severity: verdict(!parsed.ok, rules.isrcValid.severity),
        measured: raw,
        limit: 'CC-XXX-YY-NNNNN',
        unit: '',
        message: parsed.ok
          ? `ISRC ${formatIsrc(parsed.value)} is well formed.`
          : `The ISRC "${raw}" of ${describeTrack(track)} is malformed: ${lowerFirst(parsed.message)}`,
      });
    }
    if (rules.isrcUniqueInRelease && isrc !== null) {
      const others = sorted.filter((t) => t.id !== track.id && storedIsrc.get(t.id) === isrc);
      out.push({
        ruleId: 'isrcUniqueInRelease',
        trackId: track.id,
        severity: verdict(others.length > 0, rules.isrcUniqueInRelease.severity),
        measured: others.length + 1,
        limit: 1,
        unit: 'tracks',
        message:
          others.length > 0
            ? `ISRC ${formatIsrc(isrc)} is also on ${joinAnd(others.map(describeTrack))} of this release; each recording needs its own ISRC.`
            : `ISRC ${formatIsrc(isrc)} appears once in this release.`,
      });
    }
    if (rules.isrcConsistentInLabel && isrc !== null) {
      const holders = release.labelIsrcRecordings[isrc] ?? [];
      const conflicts = holders.filter((id) => id !== track.recordingId);
      out.push({
        ruleId: 'isrcConsistentInLabel',
        trackId: track.id,
        severity: verdict(conflicts.length > 0, rules.isrcConsistentInLabel.severity),
        measured: conflicts.length,
        limit: 0,
        unit: 'other recordings',
        message:
          conflicts.length > 0
            ? `ISRC ${formatIsrc(isrc)} already identifies ${conflicts.length === 1 ? 'a different recording' : `${conflicts.length} different recordings`} elsewhere in the label; one ISRC belongs to one recording for its whole life.`
            : `ISRC ${formatIsrc(isrc)} is not used by any other recording in the label.`,
      });
    }
    if (rules.requiredCredits) {
      const rule = rules.requiredCredits;
      const have = new Set(track.credits.filter((c) => c.name.trim() !== '').map((c) => c.role));
      const missing = rule.roles.filter((role) => !have.has(role));
      out.push({
        ruleId: 'requiredCredits',
        trackId: track.id,
        severity: verdict(missing.length > 0, rule.severity),
        measured: rule.roles.filter((role) => have.has(role)).join(', '),
        limit: rule.roles.join(', '),
        unit: '',
        message:
          missing.length > 0
            ? `${capitalise(describeTrack(track))} has no ${joinOr(missing.map(describeRole))} credit; the profile requires ${joinAnd(rule.roles.map(describeRole))}.`
            : `${capitalise(describeTrack(track))} credits ${joinAnd(rule.roles.map(describeRole))}, as the profile requires.`,
      });
    }
  }

  if (rules.barcode) {
    const raw = release.barcode?.trim() ? release.barcode.trim() : null;
    const parsed = raw === null ? null : parseUpcEan(raw);
    out.push({
      ruleId: 'barcode',
      trackId: null,
      severity: verdict(parsed === null || !parsed.ok, rules.barcode.severity),
      measured: raw,
      limit: 'UPC-A or EAN-13',
      unit: '',
      message:
        parsed === null
          ? 'The release has no UPC/EAN barcode.'
          : parsed.ok
            ? `The ${parsed.kind === 'upc-a' ? 'UPC-A' : 'EAN-13'} ${parsed.value} has a correct check digit.`
            : `The UPC/EAN "${raw}" is not valid: ${lowerFirst(parsed.message)}`,
    });
  }

  if (rules.artwork) {
    const rule = rules.artwork;
    const art = release.artwork;
    const formats = rule.formats.map(normaliseImageFormat);
    const wanted = `at least ${rule.minWidthPx} × ${rule.minHeightPx} px${rule.square ? ', square' : ''}, ${joinOr(formats.map((f) => f.toUpperCase()))}`;
    if (art === null) {
      out.push({
        ruleId: 'artwork',
        trackId: null,
        severity: rule.severity,
        measured: null,
        limit: wanted,
        unit: 'px',
        message: `The release has no cover art; the profile asks for ${wanted}.`,
      });
    } else {
      const format = normaliseImageFormat(art.format);
      const problems: string[] = [];
      if (!formats.includes(format)) problems.push(`it is ${format.toUpperCase()}`);
      if (art.widthPx < rule.minWidthPx || art.heightPx < rule.minHeightPx) {
        problems.push(`it is only ${art.widthPx} × ${art.heightPx} px`);
      }
      if (rule.square && art.widthPx !== art.heightPx) problems.push('it is not square');
      out.push({
        ruleId: 'artwork',
        trackId: null,
        severity: verdict(problems.length > 0, rule.severity),
        measured: `${art.widthPx} × ${art.heightPx} ${format}`,
        limit: wanted,
        unit: 'px',
        message:
          problems.length > 0
            ? `The cover art does not fit the profile: ${joinAnd(problems)}; the profile asks for ${wanted}.`
            : `The cover art (${art.widthPx} × ${art.heightPx} px ${format.toUpperCase()}) fits the profile.`,
      });
    }
  }
  return out;
}

function normaliseImageFormat(format: string): string {
  const lower = format
    .trim()
    .toLowerCase()
    .replace(/^image\//, '');
  return lower === 'jpg' ? 'jpeg' : lower;
}

function describeRole(role: string): string {
  return role.replace(/-/g, ' ');
}

function capitalise(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

function lowerFirst(text: string): string {
  return text.charAt(0).toLowerCase() + text.slice(1);
}
