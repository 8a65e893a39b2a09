/**
 * What stands between a release and approval: open failures, warnings neither resolved nor
 * waived, missing sign-offs, stale checks. A waiver names the finding it waives and the
 * measured value it saw, so it lapses by itself when that file or value changes.
 */
import type { Finding } from '../specs/types';

export interface Waiver {
  findingKey: string;
  /** The measured value when the waiver was written (JSON text), to detect change. */
  waivedMeasured: string;
  reason: string;
  waivedBy: string;
  waivedAt: string;
}

/** The comparable form of a finding's measured value. */
export function measuredFingerprint(finding: Pick<Finding, 'measured' | 'unit'>): string {
  const value =
    typeof finding.measured === 'number' ? Number(finding.measured.toFixed(6)) : finding.measured;
  return JSON.stringify([value, finding.unit]);
}

/** Waivers still in force: their finding is still a warning with the same measured value. */
export function activeWaivers(
  findings: readonly Finding[],
  waivers: readonly Waiver[],
): Map<string, Waiver> {
  const byKey = new Map(findings.map((f) => [f.key, f]));
  const active = new Map<string, Waiver>();
  for (const w of waivers) {
    const f = byKey.get(w.findingKey);
    if (f && f.severity === 'warning' && measuredFingerprint(f) === w.waivedMeasured)
      active.set(w.findingKey, w);
  }
  return active;
}

export interface ApprovalBlockers {
  failures: Finding[];
  unwaivedWarnings: Finding[];
  missing: string[];
}

/** Everything that must change before the release may be approved; empty lists mean go. */
export function findApprovalBlockers(input: {
  findings: readonly Finding[];
  waivers: readonly Waiver[];
  checksRun: boolean;
  checksStale: boolean;
  audioSignedOff: boolean;
  metadataSignedOff: boolean;
}): ApprovalBlockers {
  const active = activeWaivers(input.findings, input.waivers);
  const missing: string[] = [];
  if (!input.checksRun) missing.push('Run the checks.');
  else if (input.checksStale)
    missing.push('The release changed since the last check run: run the checks again.');
  if (!input.audioSignedOff) missing.push('The engineer has not signed off the audio.');
  if (!input.metadataSignedOff) missing.push('The metadata has not been signed off.');
  return {
    failures: input.findings.filter((f) => f.severity === 'failure'),
    unwaivedWarnings: input.findings.filter((f) => f.severity === 'warning' && !active.has(f.key)),
    missing,
  };
}

export function isApprovable(blockers: ApprovalBlockers): boolean {
  return (
    blockers.failures.length === 0 &&
    blockers.unwaivedWarnings.length === 0 &&
    blockers.missing.length === 0
  );
}

const metadataRules = new Set([
  'isrcPresent',
  'isrcValid',
  'isrcUniqueInRelease',
  'isrcConsistentInLabel',
  'barcode',
  'requiredCredits',
  'artwork',
]);

/**
 * Who may waive a warning: metadata rules are the coordinator's, everything about the
 * audio, order and gaps the engineer's (admins both). PRODUCT.md, permissions table.
 */
export function waiverPermissionFor(ruleId: string): 'waiver:metadata' | 'waiver:audio' {
  return metadataRules.has(ruleId) ? 'waiver:metadata' : 'waiver:audio';
}
