import { LOCKED_RELEASE_STATES } from '@/lib/api/metadata-schemas';

/** True when the release is approved, packaged or delivered: metadata is read-only. */
export function isLockedState(state: string): boolean {
  return (LOCKED_RELEASE_STATES as readonly string[]).includes(state);
}

export function lockedNotice(state: string): string {
  return `This release is ${state}; its metadata is locked. Reopen it to make changes.`;
}
