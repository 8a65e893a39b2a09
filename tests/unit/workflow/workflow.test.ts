import { describe, expect, it } from 'vitest';
import type { Finding } from '@/lib/specs/types';
import {
  activeWaivers,
  findApprovalBlockers,
  isApprovable,
  measuredFingerprint,
  waiverPermissionFor,
} from '@/lib/workflow/approval';
import { checkTransition, isEditable } from '@/lib/workflow/transitions';

function finding(over: Partial<Finding>): Finding {
  return {
    key: 'cd-master:truePeak:trk-1:all',
    ruleId: 'truePeak',
    profileId: 'cd-master',
    severity: 'warning',
    trackId: 'trk-1',
    channel: null,
    measured: -0.4,
    limit: -1,
    unit: 'dBTP',
    message: 'True peak reaches −0.4 dBTP.',
    ...over,
  };
}

const ready = {
  checksRun: true,
  checksStale: false,
  audioSignedOff: true,
  metadataSignedOff: true,
};

describe('transitions', () => {
  it.each([
    ['in_review', 'approve', 'coordinator', 'approved'],
    ['in_review', 'approve', 'admin', 'approved'],
    ['approved', 'reopen', 'coordinator', 'in_review'],
    ['packaged', 'acknowledge', 'distributor', 'delivered'],
    ['delivered', 'return', 'distributor', 'returned'],
    ['draft', 'submit_for_review', 'engineer', 'in_review'],
  ] as const)('%s --%s by %s--> %s', (state, action, role, to) => {
    expect(checkTransition(state, action, role)).toEqual({ ok: true, to });
  });

  it.each([
    ['in_review', 'approve', 'engineer', 'forbidden'],
    ['in_review', 'approve', 'distributor', 'forbidden'],
    ['draft', 'approve', 'coordinator', 'conflict'],
    ['approved', 'approve', 'coordinator', 'conflict'],
    ['in_review', 'sign_off_audio', 'coordinator', 'forbidden'],
    ['approved', 'sign_off_audio', 'engineer', 'conflict'],
    ['draft', 'acknowledge', 'distributor', 'conflict'],
    ['packaged', 'return', 'engineer', 'forbidden'],
  ] as const)('%s --%s by %s is refused (%s)', (state, action, role, code) => {
    const answer = checkTransition(state, action, role);
    expect(answer.ok).toBe(false);
    if (!answer.ok) {
      expect(answer.code).toBe(code);
      expect(answer.reason.length).toBeGreaterThan(10);
    }
  });

  it('an approved, packaged or delivered release is locked', () => {
    expect(['draft', 'in_review', 'returned'].every((s) => isEditable(s as never))).toBe(true);
    expect(['approved', 'packaged', 'delivered'].some((s) => isEditable(s as never))).toBe(false);
  });
});

describe('approval', () => {
  it('a failure blocks approval and cannot be waived away', () => {
    const failure = finding({ severity: 'failure', key: 'f' });
    const blockers = findApprovalBlockers({
      ...ready,
      findings: [failure],
      waivers: [
        {
          findingKey: 'f',
          waivedMeasured: measuredFingerprint(failure),
          reason: 'x',
          waivedBy: 'u',
          waivedAt: '',
        },
      ],
    });
    expect(blockers.failures).toEqual([failure]);
    expect(isApprovable(blockers)).toBe(false);
  });

  it('a warning blocks until waived; the waiver lapses when the measured value changes', () => {
    const warning = finding({});
    const waiver = {
      findingKey: warning.key,
      waivedMeasured: measuredFingerprint(warning),
      reason: 'Intended',
      waivedBy: 'u',
      waivedAt: '',
    };
    expect(isApprovable(findApprovalBlockers({ ...ready, findings: [warning], waivers: [] }))).toBe(
      false,
    );
    expect(
      isApprovable(findApprovalBlockers({ ...ready, findings: [warning], waivers: [waiver] })),
    ).toBe(true);
    const replaced = finding({ measured: -0.2 });
    expect(activeWaivers([replaced], [waiver]).size).toBe(0);
    expect(
      isApprovable(findApprovalBlockers({ ...ready, findings: [replaced], waivers: [waiver] })),
    ).toBe(false);
  });

  it('passes need nothing; sign-offs and a fresh check run are required', () => {
    const pass = finding({ severity: 'pass' });
    expect(isApprovable(findApprovalBlockers({ ...ready, findings: [pass], waivers: [] }))).toBe(
      true,
    );
    for (const missing of ['checksRun', 'audioSignedOff', 'metadataSignedOff'] as const) {
      const blockers = findApprovalBlockers({
        ...ready,
        [missing]: false,
        findings: [pass],
        waivers: [],
      });
      expect(blockers.missing.length, missing).toBe(1);
    }
    expect(
      findApprovalBlockers({ ...ready, checksStale: true, findings: [pass], waivers: [] }).missing,
    ).toEqual(['The release changed since the last check run: run the checks again.']);
  });

  it('metadata warnings are the coordinator’s to waive, audio and order the engineer’s', () => {
    expect(waiverPermissionFor('barcode')).toBe('waiver:metadata');
    expect(waiverPermissionFor('isrcPresent')).toBe('waiver:metadata');
    expect(waiverPermissionFor('truePeak')).toBe('waiver:audio');
    expect(waiverPermissionFor('gaplessJoin')).toBe('waiver:audio');
  });
});
