import { checkTrackAudio } from './audio-rules';
import { createFindingFactory, type FindingInput } from './finding';
import { checkGaps, checkLayout, findPreviousTracks, isGapless, sortTracks } from './layout-rules';
import { checkMetadata } from './metadata-rules';
import type { DeliveryProfile } from './schema';
import type { Finding, FindingSeverity, MeasurementsByTrack, ReleaseForCheck } from './types';

/**
 * Judges a release against one delivery profile (already parsed with
 * deliveryProfileSchema, as profiles from the database must be). Pure: the same inputs give the same
 * findings in the same order (per-track findings in playing order, then release-level).
 * Every configured rule yields a finding, 'pass' included, so a grid can show verdicts.
 */
export function checkRelease(
  profile: DeliveryProfile,
  release: ReleaseForCheck,
  measurementsByTrack: MeasurementsByTrack,
): Finding[] {
  const rules = profile.rules;
  const sorted = sortTracks(release.tracks);
  const previousById = findPreviousTracks(sorted);
  const inputs: FindingInput[] = [];

  sorted.forEach((track, i) => {
    const next = sorted[i + 1];
    const nextJoins = next !== undefined && previousById.get(next.id)?.id === track.id;
    inputs.push(
      ...checkTrackAudio(
        rules,
        {
          track,
          startsGaplessJoin:
            (previousById.get(track.id) ?? null) !== null && isGapless(track.gapBeforeSeconds),
          endsGaplessJoin: nextJoins && isGapless(next.gapBeforeSeconds),
        },
        measurementsByTrack[track.id] ?? null,
      ),
    );
  });
  inputs.push(...checkGaps(rules, sorted, measurementsByTrack));
  inputs.push(...checkMetadata(rules, release, sorted));
  inputs.push(...checkLayout(rules, sorted, measurementsByTrack));

  const trackOrder = new Map(sorted.map((t, i) => [t.id, i]));
  const make = createFindingFactory(profile.id);
  return inputs
    .map((input, i) => ({ finding: make(input), i }))
    .sort((a, b) => {
      const ta =
        a.finding.trackId === null
          ? sorted.length
          : (trackOrder.get(a.finding.trackId) ?? sorted.length);
      const tb =
        b.finding.trackId === null
          ? sorted.length
          : (trackOrder.get(b.finding.trackId) ?? sorted.length);
      return ta - tb || a.i - b.i;
    })
    .map(({ finding }) => finding);
}

/** Judges a release against every target profile at once, profile by profile. */
export function checkReleaseAgainstProfiles(
  profiles: readonly DeliveryProfile[],
  release: ReleaseForCheck,
  measurementsByTrack: MeasurementsByTrack,
): Finding[] {
  return profiles.flatMap((profile) => checkRelease(profile, release, measurementsByTrack));
}

export interface Verdict {
  profileId: string;
  /** null for the release-level cell. */
  trackId: string | null;
  severity: FindingSeverity;
  failures: number;
  warnings: number;
}

const RANK: Record<FindingSeverity, number> = { pass: 0, warning: 1, failure: 2 };

/**
 * One verdict per profile × track (and per profile for release-level findings): the worst
 * severity among its findings, with counts. Pass `waivedKeys` to leave waived warnings out.
 */
export function summarizeVerdicts(
  findings: readonly Finding[],
  waivedKeys: ReadonlySet<string> = new Set(),
): Verdict[] {
  const cells = new Map<string, Verdict>();
  for (const finding of findings) {
    const cellKey = `${finding.profileId}\u0000${finding.trackId ?? ''}`;
    let cell = cells.get(cellKey);
    if (!cell) {
      cell = {
        profileId: finding.profileId,
        trackId: finding.trackId,
        severity: 'pass',
        failures: 0,
        warnings: 0,
      };
      cells.set(cellKey, cell);
    }
    const severity =
      finding.severity === 'warning' && waivedKeys.has(finding.key) ? 'pass' : finding.severity;
    if (severity === 'failure') cell.failures += 1;
    if (severity === 'warning') cell.warnings += 1;
    if (RANK[severity] > RANK[cell.severity]) cell.severity = severity;
  }
  return [...cells.values()];
}
