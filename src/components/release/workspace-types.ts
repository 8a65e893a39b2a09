import type { ReleaseDetail } from '@/lib/api/schemas';
import type { Role } from '@/lib/auth/permissions';

/** What every panel of the release workspace receives. */
export interface PanelProps {
  release: ReleaseDetail;
  /** The signed-in member's role, to show or hide controls (the server checks again). */
  role: Role;
}

/** TanStack Query key of the release detail; invalidate it after any change. */
export function releaseQueryKey(releaseId: string) {
  return ['release', releaseId] as const;
}

export function checksQueryKey(releaseId: string) {
  return ['checks', releaseId] as const;
}

export function workflowQueryKey(releaseId: string) {
  return ['workflow', releaseId] as const;
}
