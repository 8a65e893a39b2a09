/**
 * The release workflow: draft → in review → approved → packaged → delivered, with returned
 * (by a distributor) and reopening. Pure: the server asks here what is allowed and why not.
 */
import { can, type Permission, type Role } from '../auth/permissions';

export type ReleaseState =
  | 'draft'
  | 'in_review'
  | 'approved'
  | 'packaged'
  | 'delivered'
  | 'returned';

export type WorkflowAction =
  | 'submit_for_review'
  | 'sign_off_audio'
  | 'sign_off_metadata'
  | 'approve'
  | 'reopen'
  | 'mark_packaged'
  | 'acknowledge'
  | 'return';

interface Transition {
  from: readonly ReleaseState[];
  to: ReleaseState | null;
  permission: Permission;
  label: string;
}

/** null `to` keeps the state (a sign-off is recorded, the state does not move). */
export const transitions: Record<WorkflowAction, Transition> = {
  submit_for_review: {
    from: ['draft', 'returned'],
    to: 'in_review',
    permission: 'check:run',
    label: 'Send for review',
  },
  sign_off_audio: {
    from: ['draft', 'in_review', 'returned'],
    to: null,
    permission: 'audio:signoff',
    label: 'Sign off audio',
  },
  sign_off_metadata: {
    from: ['draft', 'in_review', 'returned'],
    to: null,
    permission: 'release:approve',
    label: 'Sign off metadata',
  },
  approve: { from: ['in_review'], to: 'approved', permission: 'release:approve', label: 'Approve' },
  reopen: {
    from: ['approved', 'packaged', 'delivered'],
    to: 'in_review',
    permission: 'release:reopen',
    label: 'Reopen',
  },
  mark_packaged: {
    from: ['approved'],
    to: 'packaged',
    permission: 'release:approve',
    label: 'Package',
  },
  acknowledge: {
    from: ['packaged'],
    to: 'delivered',
    permission: 'package:acknowledge',
    label: 'Acknowledge',
  },
  return: {
    from: ['packaged', 'delivered'],
    to: 'returned',
    permission: 'package:acknowledge',
    label: 'Return',
  },
};

/** States in which the release's audio and metadata may change. */
export function isEditable(state: ReleaseState): boolean {
  return state === 'draft' || state === 'in_review' || state === 'returned';
}

export type Refusal = { ok: false; code: 'forbidden' | 'conflict'; reason: string };
export type Allowed = { ok: true; to: ReleaseState | null };

/** Whether `role` may take `action` on a release in `state`, and if not, why (plain words). */
export function checkTransition(
  state: ReleaseState,
  action: WorkflowAction,
  role: Role,
): Allowed | Refusal {
  const t = transitions[action];
  if (!can(role, t.permission)) {
    return {
      ok: false,
      code: 'forbidden',
      reason: `Your role (${role}) may not ${t.label.toLowerCase()}.`,
    };
  }
  if (!t.from.includes(state)) {
    return {
      ok: false,
      code: 'conflict',
      reason: `A release that is ${state.replace('_', ' ')} cannot be asked to ${t.label.toLowerCase()}.`,
    };
  }
  return { ok: true, to: t.to };
}
